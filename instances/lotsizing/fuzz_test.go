package lotsizing

import (
	"bytes"
	"errors"
	"testing"
)

const tinyTTM = "2 3\n1\n100\n1.00 1.0 10. 50.\n1.00 2.0 5. 80.\n10 20\n0 30\n40 5\nBi hi su su\ntime cost\n"

func TestReadTTM(t *testing.T) {
	in, err := ReadTTM(bytes.NewReader([]byte(tinyTTM)), "tiny.dat")
	if err != nil {
		t.Fatal(err)
	}
	// Expected values read off tinyTTM by hand.
	if len(in.Items) != 2 || in.Periods() != 3 || in.Capacity[2] != 100 || in.Items[1].SetupCost != 80 || in.Items[0].SetupTime != 10 || in.Demand[1][1] != 30 || in.Demand[0][2] != 40 {
		t.Fatalf("read %+v", in)
	}
	_, err = ReadTTM(bytes.NewReader([]byte("2 3\n1\n100\n1 x 10 50\n")), "bad.dat")
	var pe *ParseError
	if !errors.As(err, &pe) || pe.Line != 4 || pe.Column != 3 {
		t.Fatalf("want a parse error at 4:3, got %v", err)
	}
}

func FuzzReadTTM(f *testing.F) {
	f.Add([]byte(tinyTTM))
	f.Add([]byte("1 1\n1\n5\n1 1 1 1\n3\n"))
	f.Add([]byte("2 3\n1\n"))
	f.Add([]byte(""))
	f.Fuzz(func(t *testing.T, data []byte) {
		in, err := ReadTTM(bytes.NewReader(data), "fuzz.dat")
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) || pe.Line < 1 || pe.Column < 1 || pe.File != "fuzz.dat" {
				t.Fatalf("error %v (%T) is not a *ParseError with a position", err, err)
			}
			return
		}
		if err := in.Validate(); err != nil {
			t.Fatalf("accepted an invalid instance: %v", err)
		}
	})
}

func FuzzReadCSVFolder(f *testing.F) {
	f.Add([]byte(goodFolder["items.csv"]), []byte(goodFolder["demand.csv"]), []byte(goodFolder["capacity.csv"]))
	f.Add([]byte("id,unit_time\n"), []byte("item,period,quantity\n\"A,1"), []byte("period,capacity\n1,-1\n"))
	f.Fuzz(func(t *testing.T, items, demand, capacity []byte) {
		tabs := make([]*csvTable, 3)
		for k, c := range []struct {
			data     []byte
			file     string
			req, opt []string
		}{{items, "items.csv", []string{"id", "unit_time", "setup_time", "setup_cost", "holding_cost"}, []string{"name", "initial_stock"}},
			{capacity, "capacity.csv", []string{"period", "capacity"}, []string{"overtime_cost"}},
			{demand, "demand.csv", []string{"item", "period", "quantity"}, nil}} {
			tb, err := readTable(bytes.NewReader(c.data), c.file, c.req, c.opt)
			if err != nil {
				var pe *ParseError
				if !errors.As(err, &pe) || pe.Line < 1 || pe.Column < 1 || pe.File != c.file {
					t.Fatalf("error %v is not a positioned *ParseError", err)
				}
				return
			}
			tabs[k] = tb
		}
		in, err := fromTables("fuzz", tabs[0], tabs[1], tabs[2])
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) || pe.Line < 1 || pe.Column < 1 {
				t.Fatalf("error %v is not a positioned *ParseError", err)
			}
			return
		}
		if err := in.Validate(); err != nil {
			t.Fatalf("accepted an invalid instance: %v", err)
		}
	})
}
