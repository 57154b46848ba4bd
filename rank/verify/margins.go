package verify

// Share names, in the order they are reported.
const (
	ShareConduction = "conduction"
	ShareSwitching  = "switching"  // overlap, output capacitance and recovery at the hard edges
	ShareDeadTime   = "dead time"  // body-diode conduction of the synchronous switch
	ShareGate       = "gate drive" // every gate resistance: internal, external and the driver's
	ShareSwitch     = "switch total"
	ShareTotal      = "total" // switch and driver, the driver's quiescent draw left out
)

// Margin is the relative difference |predicted − simulated|/simulated
// above which a share is flagged. The figures are those of the
// cross-check of the loss models against ngspice
// (docs/spice-crosscheck.md, "Figures"): its acceptance criteria, which
// its reported medians and worst cases meet.
func Margin(share string) float64 {
	switch share {
	case ShareGate:
		return 0.10 // criterion 10 %; median 2.5 %, worst +5.5 %
	case ShareSwitching:
		// turn-on and turn-off criterion 30 % median (medians 10.7 % and
		// 14.0 %)
		return 0.30
	case ShareDeadTime:
		// the synchronous half-bridge's criterion 20 % median (held-out
		// median 2.5 %, worst +10.1 %; "The synchronous half-bridge")
		return 0.20
	default:
		// conduction, switch total and total: the total's criterion 20 %
		// (median 2.0 %, worst −16.4 %); conduction median 2.3 %, its
		// −90 % worst a light-load row where the edge tails dominate
		return 0.20
	}
}

// Floor is the share of the simulated total below which a share is not
// flagged, whatever its relative difference: a few mW against nearly
// nothing is a large ratio but no watts (the light-load turn-off rows of
// docs/spice-crosscheck.md).
const Floor = 0.02
