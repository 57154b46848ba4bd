package design

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"swrank/rank/stage"
)

// The starter files of "swrank new".
const (
	starterDesignName = "stage.toml"
	starterPartsName  = "parts.csv"
)

// starterDesign is the starter design file; {{ta}} and {{dead-time}}
// stand for the defaults of rank/stage (starterDesignText).
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
dead-time = "{{dead-time}}"        # s, at each edge of a synchronous stage (the default)
# valley = true          # diode stage in discontinuous conduction: turn on at the ringing's first valley

[driver]
vdrive = "5"             # V, on level
vdrive-off = "0"         # V, off level (negative for bipolar drive)
rsrc = "2"               # ohm, driver pull-up
rsnk = "1"               # ohm, driver pull-down
# rg-ext = "0"           # ohm, external gate resistor
# drive-edge = "2n"      # s, the driver's own output edge without its load (default: a step)

[thermal]
ta = "{{ta}}"                # °C, ambient (the same as when this line is left out)
# rth-ca = "20"          # K/W, case to ambient (heatsink), added to each part's rth_jc

[derating]
derate = 0.8             # fraction of vds_max the drain may reach

[choice]
# weighting = "euro"     # rank by weighted efficiency: euro, cec, quarters, 10-20-50-100 or "10%:0.2,50%:0.5,100%:0.3"
# parallel = "auto"      # paralleled devices per place: a count, or auto
# parallel-max = 4
# fitted = "starter-si-40"      # the part compare judges candidates against
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

// starterParts is the starter library: invented parts from 20 V to 100 V,
// silicon and GaN, every value the models use stated (nothing estimated
// but what a one-point datasheet leaves open). Its columns come in the
// order a loss estimate reads them: conduction, gate, output capacitance,
// diode, layout and thermal path, then the ratings, package and price.
const starterParts = `# swrank parts library: one row per transistor, one column per datasheet value.
# These rows are invented examples (no real part); replace them with your
# datasheets' values. Columns may come in any order and most may be left
# blank: swrank then estimates the value and says so. "swrank check
# parts.csv" reports every problem at once; "swrank parts parts.csv" lists
# the parts and how complete each row is. Columns and their test
# conditions: docs/library.md.
part,technology,rds_on,rds_on_vgs,rds_on_tj,rds_on_max,rds_on2,rds_on2_vgs,rds_on_hot,rds_on_hot_tj,qg,qg_vgs,qg_vds,qg_id,qgs,qgd,qg_th,v_plateau,vgs_th,vgs_th_hot,vgs_th_hot_tj,rg_int,ciss,coss,crss,cap_vds,qoss,eoss,oss_vds,vsd,qrr,qrr_if,l_loop,l_cs,rth_jc,rth_ja,tj_max,vds_max,id_max,id_pulse,vgs_max,vgs_min,package,price
starter-si-20,si,2.4m,4.5,25,3m,1.87m,10,3.6m,125,14n,4.5,10,30,4.18n,3.2n,2.09n,2.0,1.0,0.5,125,1.0,2.2n,685p,128p,10,17.8n,64.2n,10,0.75,12n,30,600p,400p,2.0,35,150,20,60,240,12,-8,QFN 3.3x3.3,0.30
starter-si-40,si,2.8m,4.5,25,3.5m,2.18m,10,4.2m,125,16.7n,4.5,20,35,6.67n,4.4n,3.95n,2.7,1.6,1.1,125,1.1,2.6n,842p,88p,20,42.1n,303n,20,0.8,22n,35,800p,500p,1.3,32,150,40,70,280,16,-16,QFN 5x6,0.48
starter-si-60,si,5.5m,4.5,25,6.87m,4.29m,10,8.25m,125,14.8n,4.5,30,27,6.61n,3.6n,3.88n,2.9,1.7,1.2,125,1.2,2.4n,810p,48p,30,58.3n,630n,30,0.8,30n,27,800p,500p,1.4,32,150,60,55,220,20,-20,QFN 5x6,0.62
starter-si-100,si,11m,4.5,25,13.7m,8.58m,10,16.5m,125,13.4n,4.5,50,20,6.77n,2.8n,3.93n,3.1,1.8,1.3,125,1.3,2.3n,810p,22.4p,50,93.2n,1.68u,50,0.8,45n,20,800p,500p,1.2,32,150,100,40,160,20,-20,QFN 5x6,0.95
starter-gan-30,gan,3.6m,5,25,4.5m,4.03m,4,5.76m,125,3.56n,5,15,17,1.1n,550p,627p,2.1,1.2,1.1,125,0.45,550p,106p,22.9p,15,3.34n,18n,15,2.0,0,17,200p,50p,1.1,48,150,30,35,140,6.5,-5,CSP 2.2x1.4,0.85
starter-gan-80,gan,6.5m,5,25,8.12m,7.28m,4,10.4m,125,3.76n,5,40,15,1.31n,500p,741p,2.3,1.3,1.2,125,0.45,600p,110p,7.81p,40,9.72n,140n,40,2.0,0,15,200p,50p,1.0,46,150,80,30,120,6.5,-5,CSP 3.0x1.8,1.25
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
	if err := WriteAtomic(designPath, []byte(starterDesignText()), true); err != nil {
		os.Remove(partsPath) // written just now by us: leave the directory as it was
		return "", "", err
	}
	return designPath, partsPath, nil
}

// starterDesignText is the starter design file with the defaults of
// rank/stage written in, so that the file states what leaving a line out
// would give.
func starterDesignText() string {
	return strings.NewReplacer(
		"{{ta}}", strconv.FormatFloat(float64(stage.DefaultAmbient), 'g', -1, 64),
		"{{dead-time}}", strconv.FormatFloat(float64(stage.DefaultDeadTime)*1e9, 'g', 6, 64)+"n",
	).Replace(starterDesign)
}
