package report

import (
	"encoding/json"
	"fmt"
	"io"
	"strconv"

	q "swrank/devices/quantity"
	"swrank/rank/fit"
)

// PartsList is the report of "swrank parts": each part of a library with
// its ratings, package and technology, and how complete its row is.
type PartsList struct {
	Source  string       // the library's name (its path, "stdin" or "demo")
	Devices []fit.Device // the parts, prepared, in file order
}

// PartsListJSON is one part in the JSON form of a PartsList.
type PartsListJSON struct {
	Part       string  `json:"part"`
	Technology string  `json:"technology"`
	Package    string  `json:"package"`
	VdsMaxV    float64 `json:"vds_max_v"`
	IdMaxA     float64 `json:"id_max_a"`
	Estimated  int     `json:"estimated"` // blank values the models estimate (fit.EstimateFlags)
	Estimates  string  `json:"estimates"` // their flag codes, comma-separated
}

// rows returns one PartsListJSON per part.
func (r *PartsList) rows() []PartsListJSON {
	out := make([]PartsListJSON, len(r.Devices))
	for i := range r.Devices {
		d := &r.Devices[i]
		est := d.Flags & fit.EstimateFlags
		out[i] = PartsListJSON{Part: d.Part.Name, Technology: d.Part.Technology.String(), Package: d.Part.Package,
			VdsMaxV: float64(d.Part.VdsMax), IdMaxA: float64(d.Part.IdMax), Estimated: est.Estimates(), Estimates: est.Codes()}
	}
	return out
}

// Write writes the list as table, csv, json or markdown.
func (r *PartsList) Write(w io.Writer, format string) error {
	if err := CheckFormat(format); err != nil {
		return err
	}
	rows := r.rows()
	switch format {
	case "json":
		e := json.NewEncoder(w)
		e.SetIndent("", "  ")
		return e.Encode(struct {
			Source string          `json:"source"`
			Parts  []PartsListJSON `json:"parts"`
		}{r.Source, rows})
	case "csv":
		c := newSafeCSV(w)
		all := [][]string{{"part", "technology", "package", "vds_max_v", "id_max_a", "estimated", "estimates"}}
		for _, p := range rows {
			all = append(all, []string{p.Part, p.Technology, p.Package, strconv.FormatFloat(p.VdsMaxV, 'g', -1, 64),
				strconv.FormatFloat(p.IdMaxA, 'g', -1, 64), strconv.Itoa(p.Estimated), p.Estimates})
		}
		return c.WriteAll(all)
	}
	md := format == "markdown"
	if !md {
		if _, err := fmt.Fprintf(w, "library %s: %d parts\n\n", r.Source, len(rows)); err != nil {
			return err
		}
	}
	cells := make([][]string, len(rows))
	for i, p := range rows {
		cells[i] = []string{p.Part, p.Technology, p.Package, q.Format(q.Voltage(p.VdsMaxV), 3), q.Format(q.Current(p.IdMaxA), 3),
			strconv.Itoa(p.Estimated), p.Estimates}
	}
	if err := writeTable(w, []string{"part", "tech", "package", "vds max", "id max", "est.", "estimated values"}, cells, md); err != nil {
		return err
	}
	if md {
		return nil
	}
	_, err := fmt.Fprintln(w, "\nest.: blank values the models estimate for this part (its row is complete at 0); \"swrank rank -h\" and docs/library.md say what each needs")
	return err
}
