// Package stage turns an operating point as the user states it (Stage:
// topology, voltages, load, frequency, gate driver, thermal path) into a
// resolved point (Point): every default filled, the inputs checked, the
// conduction mode chosen, and the stresses each place of the stage puts on
// its switch (SwitchStress: blocked voltage, currents at the edges, rms
// and peak currents, which edges are hard, dead-time currents). Class E
// and class D points carry their resonant design (rank/resonant).
//
// It knows nothing of parts or loss models: it is evaluated once per
// operating point, not per part.
package stage
