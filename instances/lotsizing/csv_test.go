package lotsizing

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"testing"

	"pincer/decomp"
)

func writeFolder(t *testing.T, files map[string]string) string {
	dir := t.TempDir()
	for name, body := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

var goodFolder = map[string]string{
	"items.csv":    "id,name,unit_time,setup_time,setup_cost,holding_cost,initial_stock\nA,alpha,1,10,50,1,5\nB,,2,5,80,2,\n",
	"demand.csv":   "item,period,quantity\nA,1,10\nB,2,30\nA,3,40\n",
	"capacity.csv": "period,capacity,overtime_cost\n1,100,\n2,100,4\n3,90,\n",
}

func TestReadCSVFolder(t *testing.T) {
	in, err := ReadCSVFolder(writeFolder(t, goodFolder))
	if err != nil {
		t.Fatal(err)
	}
	// Expected values read off goodFolder by hand.
	if len(in.Items) != 2 || in.Items[0].Name != "alpha" || in.Items[1].Name != "B" || in.Items[0].InitialStock != 5 ||
		in.Demand[0][2] != 40 || in.Demand[1][1] != 30 || in.Capacity[2] != 90 || in.OvertimeCost[1] != 4 || in.OvertimeCost[0] != -1 {
		t.Fatalf("read %+v", in)
	}
	bad := map[string]string{}
	for k, v := range goodFolder {
		bad[k] = v
	}
	bad["demand.csv"] = "item,period,quantity\nA,1,10\nB,7,30\n"
	_, err = ReadCSVFolder(writeFolder(t, bad))
	var pe *ParseError
	if !errors.As(err, &pe) || pe.File != "demand.csv" || pe.Line != 3 || pe.Column != 2 {
		t.Fatalf("want demand.csv:3:2, got %v", err)
	}
}

func TestDemoPlans(t *testing.T) {
	in := Demo()
	if err := in.Validate(); err != nil {
		t.Fatal(err)
	}
	opt := Options{OvertimeCost: 90}
	p, err := NewProblem(in, opt)
	if err != nil {
		t.Fatal(err)
	}
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 100})
	if err != nil {
		t.Fatal(err)
	}
	if res.Plan == nil {
		t.Fatal("the overtime variant always has a plan")
	}
	if err := Verify(in, res.Plan.Detail.(*Schedule), overtimeCosts(in, opt)); err != nil {
		t.Fatal(err)
	}
	if res.Bound > res.Plan.Value+1e-6 {
		t.Fatalf("bound %v above plan %v", res.Bound, res.Plan.Value)
	}
}
