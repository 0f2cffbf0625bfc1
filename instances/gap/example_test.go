package gap_test

import (
	"fmt"
	"os"
	"strings"

	"pincer/instances/gap"
)

// Reading a small instance in the one-instance layout and checking a plan.
func Example() {
	const data = `2 3
4 7 3
6 2 5
5 4 6
3 8 2
10 9
`
	in, err := gap.ReadORLib(strings.NewReader(data), "tiny.txt", 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %d agents, %d jobs\n", in.Name, in.Agents, in.Jobs)

	// Jobs 1 and 2 to agent 1, job 3 to agent 2 (0-based in Go).
	v := gap.Verify(in, []int{0, 0, 1}, false)
	fmt.Println("feasible:", v.Feasible, "cost:", v.Value, "load:", v.Load)

	v = gap.Verify(in, []int{0, 0, 0}, false)
	fmt.Println("feasible:", v.Feasible, v.Problems)

	if err := gap.WritePlanCSV(os.Stdout, in, []int{0, 0, 1}); err != nil {
		fmt.Println(err)
	}
	// Output:
	// tiny.txt: 2 agents, 3 jobs
	// feasible: true cost: 16 load: [9 2]
	// feasible: false [agent 1 over capacity by 5 (load 15, capacity 10)]
	// job,agent,cost,use
	// 1,1,4,5
	// 2,1,7,4
	// 3,2,5,2
}

// A fault in a file names the file, line, column, token and what was
// expected there.
func ExampleReadORLib_error() {
	const data = "1\n2 3\n4 7 3\n6 2 5\n5 4 6\n3 8 2\n10 x\n"
	_, err := gap.ReadORLib(strings.NewReader(data), "tiny.txt", 1)
	fmt.Println(err)
	// Output:
	// tiny.txt:7:4: token 17: expected capacity of agent 2 of instance 1 (non-negative integer <= 1000000000): got "x"
}

// Generated instances are the same for the same seed.
func ExampleGenerate() {
	a, _ := gap.Generate('c', 5, 100, 1)
	b, _ := gap.Generate('c', 5, 100, 1)
	fmt.Println(a.Name, a.Agents, a.Jobs, fmt.Sprint(a.Capacity) == fmt.Sprint(b.Capacity))
	// Output:
	// c05100-s1 5 100 true
}
