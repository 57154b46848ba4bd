package main

// jsonRow is a row of a results table of the JSON document (docs/output.md).
type jsonRow struct {
	Rank             *float64 `json:"rank"`
	Part             string   `json:"part"`
	TotalW           float64  `json:"total_w"`
	SwitchW          float64  `json:"switch_w"`
	DriverW          float64  `json:"driver_w"`
	ConductionW      float64  `json:"conduction_w"`
	TurnOnW          float64  `json:"turn_on_w"`
	TurnOffW         float64  `json:"turn_off_w"`
	CossW            float64  `json:"coss_w"`
	RecoveryW        float64  `json:"recovery_w"`
	DeadTimeW        float64  `json:"dead_time_w"`
	GateInternalW    float64  `json:"gate_internal_w"`
	GateDriverW      float64  `json:"gate_driver_w"`
	GateResistorW    float64  `json:"gate_resistor_w"`
	TjC              *float64 `json:"tj_c"`
	EffPct           *float64 `json:"eff_pct"`
	SetAside         bool     `json:"set_aside"`
	PeakV            *float64 `json:"peak_v"`
	ShuntToAddF      *float64 `json:"shunt_to_add_f"`
	FLimitHz         *float64 `json:"f_limit_hz"`
	EffWithDriverPct *float64 `json:"eff_with_driver_pct"`
}

// jsonDoc is the JSON document of rank and explain, as far as the tests
// read it.
type jsonDoc struct {
	SchemaVersion  int            `json:"schema_version"`
	OperatingPoint map[string]any `json:"operating_point"`
	Results        []jsonRow      `json:"results"`
	Result         []jsonRow      `json:"result"`
}
