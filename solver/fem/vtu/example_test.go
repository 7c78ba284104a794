package vtu_test

import (
	"log"
	"os"

	"tearline/solver/fem/vtu"
)

func ExampleCollection() {
	var c vtu.Collection
	c.Add(0, "fields/step0000.vtu")
	c.Add(0.25, "fields/step0010.vtu")
	if err := c.Write(os.Stdout); err != nil {
		log.Fatal(err)
	}
	// Output:
	// <?xml version="1.0"?>
	// <VTKFile type="Collection" version="0.1" byte_order="LittleEndian">
	// <Collection>
	// <DataSet timestep="0" group="" part="0" file="fields/step0000.vtu"/>
	// <DataSet timestep="0.25" group="" part="0" file="fields/step0010.vtu"/>
	// </Collection>
	// </VTKFile>
}
