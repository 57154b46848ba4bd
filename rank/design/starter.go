package design

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
)

// The starter files of "swrank new".
const (
	starterDesignName = "stage.toml"
	starterPartsName  = "parts.csv"
)

const starterDesign = `# swrank design file: the stage your parts are judged in.
#
#   swrank rank --design stage.toml          rank the library below
#   swrank compare --design stage.toml --fitted PART
#   swrank sweep --design stage.toml --var fsw --from 100k --to 2M --plot loss.svg
#
# Keys are the command-line flags' names ("swrank rank -h" lists them with
# their units); a flag given on the command line overrides the file. Values
# take SI prefixes and optional units, as text ("500k", "4.7n", "280 mOhm")
# or plain numbers (12, 0.3).

# The parts library, relative to this file ("demo" for the built-in one).
parts = "parts.csv"

[stage]
topology = "buck"        # buck, boost or custom
rectifier = "sync"       # sync (a transistor) or diode
position = "pair"        # the place ranked: pair, control or sync
vin = "12"               # V
vout = "1.2"             # V
iout = "10"              # A, the rated load
fsw = "500k"             # Hz
ripple = 0.3             # peak-to-peak, fraction of the inductor current
# inductance = "1u"      # H, instead of ripple: fixes the ripple in amperes
dead-time = "20n"        # s, at each edge of a synchronous stage
# valley = true          # diode stage in discontinuous conduction: turn on at the ringing's first valley

[driver]
vdrive = "5"             # V, on level
vdrive-off = "0"         # V, off level (negative for bipolar drive)
rsrc = "2"               # ohm, driver pull-up
rsnk = "1"               # ohm, driver pull-down
# rg-ext = "0"           # ohm, external gate resistor

[thermal]
ta = "40"                # °C, ambient
# rth-ca = "20"          # K/W, case to ambient (heatsink), added to each part's rth_jc

[derating]
derate = 0.8             # fraction of vds_max the drain may reach

[choice]
# weighting = "euro"     # rank by weighted efficiency: euro, cec, quarters, 10-20-50-100 or "10%:0.2,50%:0.5,100%:0.3"
# parallel = "auto"      # paralleled devices per place: a count, or auto
# parallel-max = 4
# fitted = "starter-30-low-r"   # the part compare judges candidates against
# top = 10

# Named operating points with weights, instead of a weighting (each takes
# any [stage], [driver] or [thermal] key; the rest comes from above):
# [[point]]
# name = "full load"
# weight = 0.3
# iout = "10"
#
# [[point]]
# name = "standby"
# weight = 0.7
# iout = "0.5"
`

const starterParts = `# swrank parts library: one row per transistor, one column per datasheet value.
# These rows are invented examples (no real part); replace them with your
# datasheets' values. "swrank check parts.csv" reports every problem at once.
# Columns and their test conditions: docs/library.md.
part,package,technology,price,vds_max,id_max,id_pulse,vgs_max,vgs_th,vgs_th_max,rds_on,rds_on_vgs,rds_on_tj,rds_on_max,rds_on_hot,rds_on_hot_tj,qg,qg_vgs,qg_max,qg_vds,qg_id,qgs,qgd,qg_th,v_plateau,rg_int,ciss,coss,crss,cap_vds,vsd,qrr,rth_ja,rth_jc,tj_max
starter-30-low-r,PKG-5x6,si,0.85,30,80,300,20,1.8,2.4,2.0m,10,25,2.6m,3.0m,125,40n,10,52n,15,20,10n,8n,5n,2.8,1.2,5n,1.2n,120p,15,0.8,40n,40,1.2,150
starter-30-fast,PKG-3x3,si,0.45,30,30,120,20,1.7,2.3,6.5m,10,25,8.0m,9.5m,125,9n,10,12n,15,10,2.6n,1.8n,1.2n,2.6,0.8,1.2n,300p,30p,15,0.8,12n,50,3,150
starter-40-mid,PKG-5x6,si,0.60,40,50,200,20,2.0,2.8,4.0m,10,25,5.0m,6.2m,125,20n,10,27n,20,15,5n,4n,2.5n,3.0,1.0,2.6n,600p,50p,20,0.8,25n,45,2,175
`

// WriteStarter writes the starter design file (stage.toml) and parts
// library (parts.csv) into dir, creating dir when needed, and returns
// their paths. It never overwrites a file: when either exists it writes
// neither, and when the second write fails it removes the first.
func WriteStarter(dir string) (designPath, partsPath string, err error) {
	designPath = filepath.Join(dir, starterDesignName)
	partsPath = filepath.Join(dir, starterPartsName)
	// Refuse before writing anything.
	for _, p := range []string{designPath, partsPath} {
		if _, err := os.Lstat(p); err == nil {
			return "", "", fmt.Errorf("%s already exists: swrank new never overwrites a file (choose another directory, or move the file away)", p)
		} else if !errors.Is(err, os.ErrNotExist) {
			return "", "", fmt.Errorf("new: %w", err)
		}
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", "", fmt.Errorf("new: %w", err)
	}
	if err := WriteAtomic(partsPath, []byte(starterParts), true); err != nil {
		return "", "", err
	}
	if err := WriteAtomic(designPath, []byte(starterDesign), true); err != nil {
		os.Remove(partsPath) // written just now by us: leave the directory as it was
		return "", "", err
	}
	return designPath, partsPath, nil
}
