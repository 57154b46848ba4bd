package evaluate

import q "swrank/devices/quantity"

// Trace records the steps of one evaluation for explain: each formula with
// its inputs and its result. Evaluate fills it only when given a non-nil
// Trace, so ranking pays nothing for it.
type Trace struct {
	Steps []Step // in the order the evaluation took them
}

// Step is one recorded formula.
type Step struct {
	Device  string // "control", "sync" or "" for the stage
	Topic   string // e.g. "conduction", "turn-on", "thermal"
	Formula string // the equation in words and symbols
	Terms   []Term // inputs first, the result last
}

// Term is a named value with its kind (for printing with its unit).
type Term struct {
	Name  string  // the symbol or words, e.g. "Qgd at V"
	Value float64 // in SI units
	Kind  q.Kind  // the quantity, which gives its unit
}

// T makes a Term from a typed quantity.
func T[Q q.Quantity](name string, v Q) Term {
	return Term{Name: name, Value: float64(v), Kind: v.Kind()}
}

// N makes a Term from a bare number.
func N(name string, v float64) Term { return Term{Name: name, Value: v, Kind: q.Ratio(0).Kind()} }

func (t *Trace) add(dev, topic, formula string, terms ...Term) {
	t.Steps = append(t.Steps, Step{Device: dev, Topic: topic, Formula: formula, Terms: terms})
}
