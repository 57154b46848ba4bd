package devices

import (
	"errors"
	"slices"
	"strings"
	"testing"
)

func TestMerge(t *testing.T) {
	a := &Library{Source: "a.csv", Parts: []Part{{Name: "one"}, {Name: "two"}}}
	b := &Library{Source: "b.csv", Parts: []Part{{Name: "three"}}}
	dup := &Library{Source: "c.csv", Parts: []Part{{Name: "TWO"}}}
	for _, tt := range []struct {
		name    string
		libs    []*Library
		parts   []string
		source  string
		wantErr []string
	}{
		{"one library", []*Library{a}, []string{"one", "two"}, "a.csv", nil},
		{"two libraries", []*Library{a, b}, []string{"one", "two", "three"}, "a.csv, b.csv", nil},
		{"a name in two files", []*Library{a, b, dup}, nil, "", []string{`"TWO"`, "a.csv", "c.csv"}},
		{"none", nil, nil, "", []string{"no parts"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			got, err := Merge(tt.libs...)
			if tt.wantErr != nil {
				if err == nil {
					t.Fatalf("no error")
				}
				for _, w := range tt.wantErr {
					if !strings.Contains(err.Error(), w) {
						t.Errorf("error %q lacks %q", err, w)
					}
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			var names []string
			for _, p := range got.Parts {
				names = append(names, p.Name)
			}
			if !slices.Equal(names, tt.parts) || got.Source != tt.source {
				t.Errorf("got %q from %q, want %q from %q", names, got.Source, tt.parts, tt.source)
			}
		})
	}
	var n PartNames
	if err := n.Add("x", "a.csv"); err != nil {
		t.Fatal(err)
	}
	if err := n.Add("X", "b.csv"); !errors.Is(err, ErrDuplicatePart) {
		t.Errorf("same name in two sources: %v", err)
	}
}

func TestNearestNames(t *testing.T) {
	known := []string{"vdrive", "vdrive-off", "vin", "vout", "slate-30-lo", "slate-30-fast"}
	for _, tt := range []struct {
		in   string
		want []string
	}{
		{"vdriv", []string{"vdrive"}},
		{"vdrive", nil},
		{"VOTU", []string{"vout"}},
		{"slate-30-l", []string{"slate-30-lo"}},
		{"zzzzzz", nil},
	} {
		if got := NearestNames(tt.in, known); !slices.Equal(got, tt.want) {
			t.Errorf("NearestNames(%q) = %q, want %q", tt.in, got, tt.want)
		}
	}
}
