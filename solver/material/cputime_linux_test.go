//go:build linux

package material

import "syscall"

// processCPUSeconds returns the user+system CPU time of the process, so
// that benchmarks can report throughput per CPU-second on a shared machine.
func processCPUSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return float64(ru.Utime.Sec+ru.Stime.Sec) + 1e-6*float64(ru.Utime.Usec+ru.Stime.Usec)
}
