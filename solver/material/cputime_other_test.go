//go:build !linux

package material

// processCPUSeconds is not measured on this platform.
func processCPUSeconds() float64 { return 0 }
