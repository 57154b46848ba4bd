package main

import (
	"encoding/csv"
	"strings"
	"testing"
)

// The plain ranking, decorated with the worst case and the price front
// (linear.csv at stage.toml's 20 A and 200 kHz; hand values from the
// models): lin-a 400·2 mΩ + 0.4 = 1.2 W typical, 400·2.5 mΩ (rds_on_max)
// + 0.4 = 1.4 W worst; the runner-up lin-b 1.6 + 0.2 = 1.8 W: a 0.6 W lead
// over a 0.2 W spread is a clear choice. Prices 2.00 (lin-a), 1.00 (lin-b,
// 1.8 W), 1.50 (case-d, 2.0 W: dearer and lossier than lin-b), 0.50 (lin-c,
// 3.25 W): the front is lin-c, lin-b, lin-a.
func TestRankDecorations(t *testing.T) {
	var j struct {
		Spread []struct {
			Leader string  `json:"part"`
			Runner string  `json:"runner_up"`
			Lead   float64 `json:"lead"`
			Width  float64 `json:"spread"`
			Clear  bool    `json:"clear"`
		} `json:"leader_spread"`
		Results []struct {
			Part   string   `json:"part"`
			TotalW float64  `json:"total_w"`
			WorstW *float64 `json:"worst_total_w"`
			Price  *float64 `json:"price"`
			Front  bool     `json:"price_front"`
		} `json:"results"`
	}
	decoded(t, &j, "rank", "--design", decisionsDir+"/stage.toml", "--format", "json")
	if len(j.Results) == 0 || j.Results[0].Part != "lin-a" || j.Results[0].WorstW == nil {
		t.Fatalf("worst case %+v", j.Results)
	}
	closeTo(t, "lin-a worst", *j.Results[0].WorstW, 1.4, 1e-9)
	if len(j.Spread) != 1 || j.Spread[0].Leader != "lin-a" || j.Spread[0].Runner != "lin-b" || !j.Spread[0].Clear {
		t.Fatalf("spread %+v", j.Spread)
	}
	closeTo(t, "lead", j.Spread[0].Lead, 0.6, 1e-9)
	closeTo(t, "spread", j.Spread[0].Width, 0.2, 1e-9)
	var front []string
	for _, r := range j.Results {
		if r.Front {
			front = append(front, r.Part)
		}
	}
	if strings.Join(front, ",") != "lin-a,lin-b,lin-c" {
		t.Errorf("front %v", front)
	}
	code, out, _ := runSw(t, "rank", "--design", decisionsDir+"/stage.toml")
	if code != 0 || !strings.Contains(out, "a clear choice") || !strings.Contains(out, "- lin-b: price 1.00, loss 1.80 W") ||
		!strings.Contains(out, "parts no other part beats on both") {
		t.Errorf("table:\n%s", out)
	}
	code, out, _ = runSw(t, "rank", "--design", decisionsDir+"/stage.toml", "--format", "csv")
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if code != 0 || err != nil || len(rows) < 2 {
		t.Fatalf("csv: %v\n%s", err, out)
	}
	h := rows[0]
	if h[len(h)-3] != "worst_total_w" || h[len(h)-1] != "price_front" {
		t.Errorf("csv header %v", h)
	}
	if rows[1][1] != "lin-a" || rows[1][len(h)-3] != "1.4" || rows[1][len(h)-1] != "true" {
		t.Errorf("csv row %v", rows[1])
	}
	// Paralleled parts count N × price: lin-c ×4 costs 2.00.
	var p struct {
		Results []struct {
			Part  string  `json:"part"`
			Price float64 `json:"price"`
		} `json:"results"`
	}
	decoded(t, &p, "rank", "--design", decisionsDir+"/stage.toml", "--format", "json", "--parallel", "4")
	for _, r := range p.Results {
		if r.Part == "lin-c ×4" {
			closeTo(t, "price of 4", r.Price, 2.0, 1e-12)
		}
	}
}
