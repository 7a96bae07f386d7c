package plan

// The link budget: EIRP, received level and margin.

// EIRPDBm returns the effective isotropically radiated power in dBm: the
// transmitter output (dBm) less the whole feedline loss (dB) plus the
// antenna gain (dBi).
func EIRPDBm(txPowerDBm, feedlineLossDB, gainDBi float64) float64 {
	return txPowerDBm - feedlineLossDB + gainDBi
}

// LinkBudget holds the terms of a one-way link budget. Losses are positive
// numbers of dB; the JSON names follow the link contract.
type LinkBudget struct {
	TxPowerDBm       float64 `json:"tx_power_dbm"`        // transmitter output
	TxFeedlineLossDB float64 `json:"tx_feedline_loss_db"` // whole line at the transmitter: matched, SWR, connectors
	TxGainDBi        float64 `json:"tx_gain_dbi"`         // transmitting antenna gain towards the path
	PathLossDB       float64 `json:"path_loss_db"`        // basic transmission loss, free space plus excess
	RxGainDBi        float64 `json:"rx_gain_dbi"`         // receiving antenna gain towards the path
	RxFeedlineLossDB float64 `json:"rx_feedline_loss_db"` // whole line at the receiver
	RxSensitivityDBm float64 `json:"rx_sensitivity_dbm"`  // the level the receiver needs
	TxBodyLossDB     float64 `json:"tx_body_loss_db"`     // operator's body at a handheld transmitter
	RxBodyLossDB     float64 `json:"rx_body_loss_db"`     // operator's body at a handheld receiver
	ClutterLossDB    float64 `json:"clutter_loss_db"`     // terminal clutter at both ends (ITU-R P.2108)
}

// LinkLevels is the outcome of a LinkBudget: EIRP, the level at the
// receiver input and the margin over its sensitivity.
type LinkLevels struct {
	EIRPDBm    float64 `json:"eirp_dbm"`
	RxPowerDBm float64 `json:"rx_power_dbm"`
	MarginDB   float64 `json:"margin_db"`
}

// Levels adds up the budget:
//
//	EIRP = P_tx − L_feed,tx + G_tx − L_body,tx
//	P_rx = EIRP − L_path − L_clutter + G_rx − L_body,rx − L_feed,rx
//	margin = P_rx − sensitivity
//
// All in dB/dBm; a negative margin means the link falls short by that much.
// The body loss of a handheld transmitter is taken out of its EIRP (what the
// body absorbs is not radiated); the terminal clutter losses of both ends
// add to the path loss, as ITU-R P.2108-1 §3.1 adds them to the basic
// transmission loss.
func (b LinkBudget) Levels() LinkLevels {
	eirp := EIRPDBm(b.TxPowerDBm, b.TxFeedlineLossDB, b.TxGainDBi) - b.TxBodyLossDB
	rx := eirp - b.PathLossDB - b.ClutterLossDB + b.RxGainDBi - b.RxBodyLossDB - b.RxFeedlineLossDB
	return LinkLevels{EIRPDBm: eirp, RxPowerDBm: rx, MarginDB: rx - b.RxSensitivityDBm}
}
