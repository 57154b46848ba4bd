package report

import (
	"swrank/rank"
	"swrank/rank/fit"
)

// PartsList is what swrank parts lists: each part of a library with its
// ratings, package and technology, and how complete its row is.
type PartsList struct {
	Source  string       // the library's name (its path, "stdin" or "demo")
	Devices []fit.Device // the parts, prepared, in file order
	// SetAside are the parts that could not be prepared, with the reason.
	SetAside []rank.SetAside
}

// PartsListJSON is one part of the list as the JSON document's "parts"
// array holds it (the fields of the same names).
type PartsListJSON struct {
	Part       string  `json:"part"`
	Technology string  `json:"technology"`
	Package    string  `json:"package"`
	VdsMaxV    float64 `json:"vds_max_v"`
	IdMaxA     float64 `json:"id_max_a"`
	Estimated  int     `json:"estimated"` // blank values the models estimate (fit.EstimateFlags)
	Estimates  string  `json:"estimates"` // their flag codes, comma-separated
}

// partsColumns are the list's columns, in every format.
var partsColumns = []string{"part", "technology", "package", "vds_max_v", "id_max_a", "estimated", "estimates"}

// Report builds the list's report: one row per part, and a line saying
// what the count of estimates means.
func (r *PartsList) Report() *Report {
	n := len(r.Devices) + len(r.SetAside)
	rep := &Report{Command: "parts", Library: r.Source, Parts: n}
	rep.About = []string{"library " + r.Source + ": " + Plural(n, "part", "parts")}
	t := Table{Name: "parts", Compact: partsColumns, Fit: "estimates"}
	for i := range r.Devices {
		d := &r.Devices[i]
		est := d.Flags & fit.EstimateFlags
		var row Row
		row.Set("part", Text(d.Part.Name))
		row.Set("technology", Text(d.Part.Technology.String()))
		row.Set("package", Text(d.Part.Package))
		row.Set("vds_max_v", Num(float64(d.Part.VdsMax)))
		row.Set("id_max_a", Num(float64(d.Part.IdMax)))
		row.Set("estimated", Num(float64(est.Estimates())))
		row.Set("estimates", Text(est.Codes()))
		t.Rows = append(t.Rows, row)
	}
	rep.Tables = []Table{t}
	rep.Sections = []Section{{Key: "legend", Lines: []string{
		"est: blank values the models estimate for this part (0: its row is complete); estimated values: their codes, " +
			"cut to the width (--format csv or json lists them whole); \"swrank rank -h\" and docs/library.md say what each needs"}}}
	if len(r.SetAside) > 0 {
		rep.Sections = append(rep.Sections, setAsideSection(r.SetAside, 0, nil))
	}
	return rep
}
