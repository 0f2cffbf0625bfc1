package cflp_test

import (
	"errors"
	"fmt"
	"os"
	"strings"

	"pincer/instances/cflp"
)

func ExampleReadORLib() {
	// Two sites (capacity, fixed cost), then per customer its demand and
	// the cost of serving all of it from each site.
	src := `2 3
 100 7500.
 80  0.
 20  400.5 .00000
 30  150   900
 10  80    60
`
	in, err := cflp.ReadORLib(strings.NewReader(src), "demo.txt", 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(in.Name, len(in.Sites), "sites", len(in.Customers), "customers")
	fmt.Println("demand", in.TotalDemand(), "capacity", in.TotalCapacity())
	fmt.Println("site 2 serves customer 1 for", in.Cost[1][0])

	_, err = cflp.ReadORLib(strings.NewReader("2 3\n100 7500.\n80 0.\nx"), "demo.txt", 0)
	var pe *cflp.ParseError
	fmt.Println(errors.As(err, &pe), err)
	// Output:
	// demo 2 sites 3 customers
	// demand 60 capacity 180
	// site 2 serves customer 1 for 0
	// true demo.txt:4:1: expected demand of customer 1 (positive number): got "x"
}

func ExampleVerify() {
	in := &cflp.Instance{
		Sites: []cflp.Site{
			{ID: "Hill", Capacity: 50, FixedCost: 100},
			{ID: "Port", Capacity: 40, FixedCost: 80},
		},
		Customers: []cflp.Customer{{ID: "bakery", Demand: 20}, {ID: "mill", Demand: 30}},
		Cost:      [][]float64{{40, 90}, {60, 30}},
	}
	// Hill ships 20 to the bakery; Port ships 30 to the mill:
	// 100 + 80 fixed, 40 + 30 transport.
	v := cflp.Verify(in, [][]float64{{20, 0}, {0, 30}}, true)
	fmt.Println(v.Feasible, v.Value, v.Load)
	// Port alone would carry 50 > 40.
	v = cflp.Verify(in, [][]float64{{0, 0}, {20, 30}}, true)
	fmt.Println(v.Feasible, v.Problems)
	// Output:
	// true 250 [20 30]
	// false [site Port ships 50, above its capacity 40 by 10]
}

func ExampleWritePlanCSV() {
	in := &cflp.Instance{
		Sites:     []cflp.Site{{ID: "Hill", Capacity: 50, FixedCost: 100}},
		Customers: []cflp.Customer{{ID: "bakery", Demand: 20}, {ID: "mill", Demand: 30}},
		Cost:      [][]float64{{40, 90}},
	}
	if err := cflp.WritePlanCSV(os.Stdout, in, [][]float64{{20, 30}}); err != nil {
		fmt.Println(err)
	}
	// Output:
	// site,customer,quantity,cost
	// Hill,bakery,20,40
	// Hill,mill,30,90
}

func ExampleWriteMPS() {
	in := &cflp.Instance{
		Name:      "one",
		Sites:     []cflp.Site{{ID: "Hill", Capacity: 50, FixedCost: 100}},
		Customers: []cflp.Customer{{ID: "bakery", Demand: 20}},
		Cost:      [][]float64{{40}},
	}
	if err := cflp.WriteMPS(os.Stdout, in, false); err != nil {
		fmt.Println(err)
	}
	// Output:
	// * capacitated facility location, instance one, split demand: X continuous in [0,1]
	// * Y<i>: site i open; X<i>_<j>: share of customer j's demand served by site i
	// * D<j> demand rows, C<i> capacity rows, L<i>_<j> linking rows, AGG total capacity row
	// * i and j count from 1 in decimal
	// NAME          one
	// ROWS
	//  N  COST
	//  E  D1
	//  L  C1
	//  L  L1_1
	//  G  AGG
	// COLUMNS
	//     MARKER    'MARKER'                 'INTORG'
	//     Y1        COST      100
	//     Y1        C1        -50
	//     Y1        AGG       50
	//     Y1        L1_1      -1
	//     MARKER    'MARKER'                 'INTEND'
	//     X1_1      COST      40
	//     X1_1      D1        1
	//     X1_1      C1        20
	//     X1_1      L1_1      1
	// RHS
	//     RHS       D1        1
	//     RHS       AGG       20
	// BOUNDS
	//  UP BND       Y1        1
	//  UP BND       X1_1      1
	// ENDATA
}
