package gap

import (
	"bytes"
	"errors"
	"reflect"
	"testing"
)

func FuzzReadORLib(f *testing.F) {
	f.Add([]byte(orlibMultiText))
	f.Add([]byte(orlibSingleText))
	f.Add([]byte("1\n1 1\n5\n5\n5\n"))
	f.Add([]byte("3 2 1"))
	f.Add([]byte("1\n5000 10000\n"))
	f.Add([]byte(""))
	f.Add([]byte("2\n1 1 -3 4 4\n1 1 3 4 4 9\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		in, err := ReadORLib(bytes.NewReader(data), "fuzz.txt", 1)
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) || pe.Line < 1 || pe.Column < 1 || pe.File != "fuzz.txt" {
				t.Fatalf("error %v (%T) is not a *ParseError with a position", err, err)
			}
			return
		}
		if err := in.Validate(); err != nil {
			t.Fatalf("accepted an invalid instance: %v", err)
		}
		var buf bytes.Buffer
		if err := WriteORLib(&buf, in); err != nil {
			t.Fatal(err)
		}
		back, err := ReadORLib(&buf, "fuzz.txt", 1)
		if err != nil {
			t.Fatalf("re-reading written instance: %v", err)
		}
		back.Name = in.Name
		if !reflect.DeepEqual(back, in) {
			t.Fatal("round trip changed the instance")
		}
	})
}

func FuzzReadPlanCSV(f *testing.F) {
	f.Add([]byte("job,agent,cost,use\n1,1,4,5\n2,1,7,4\n3,2,5,2\n"))
	f.Add([]byte("job,agent,cost,use\n3,2,,\n1,1,,\n2,2,,\n"))
	f.Add([]byte("job,agent,cost,use\n1,\"1\n"))
	f.Add([]byte("job,agent\n"))
	f.Add([]byte(""))
	f.Fuzz(func(t *testing.T, data []byte) {
		in := handInstance()
		assign, err := ReadPlanCSV(bytes.NewReader(data), "fuzz.csv", in)
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) || pe.Line < 1 || pe.File != "fuzz.csv" {
				t.Fatalf("error %v (%T) is not a *ParseError with a line", err, err)
			}
			return
		}
		if len(assign) != in.Jobs {
			t.Fatalf("plan of %d entries", len(assign))
		}
		var buf bytes.Buffer
		if err := WritePlanCSV(&buf, in, assign); err != nil {
			t.Fatalf("accepted plan cannot be written: %v", err)
		}
		back, err := ReadPlanCSV(&buf, "fuzz.csv", in)
		if err != nil || !reflect.DeepEqual(back, assign) {
			t.Fatalf("round trip: %v, %v vs %v", err, back, assign)
		}
	})
}
