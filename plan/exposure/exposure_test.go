package exposure

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"
)

// Sources of the reference figures below:
//   - 47 CFR § 1.1310(e)(1) Table 1 (limits in mW/cm², 1 mW/cm² = 10 W/m²).
//   - FCC OET Bulletin 65 (ed. 97-01) and its Supplement B (duty factors,
//     averaging, worked examples).
//   - 47 CFR § 1.1307(b)(3)(i)(C) (exemption thresholds).
//   - ICNIRP 2020 Table 5: FROM MEMORY. Neither the published table nor a
//     faithful copy was found; secondary copies agree with the values
//     below (public 27.7 V/m, 0.073 A/m, 2 W/m² at 30–400 MHz; f/200 W/m² at
//     400–2000 MHz; 10 and 50 W/m² above 2 GHz), and a sentence quoted from
//     the guidelines' appendix says they "retain the ICNIRP (1998) reference
//     levels for whole-body exposure" above 6 GHz (50 and 10 W/m²).
//   - ICNIRP 1998 Table 7 (general public) and its averaging times: checked
//     against the public reference levels of Council Recommendation
//     1999/519/EC, Annex III (taken from ICNIRP 1998 Table 7), read as
//     reproduced in French Décret n° 2002-775 du 3 mai 2002, annex § 2.2 A
//     (Légifrance text, stored copy in the public repository
//     etalab/lois-non-codifiees-et-reglements-francais). [quoted copy]
//   - ICNIRP 1998 Table 6 (occupational): FROM MEMORY, checked in part: the
//     E-field column to 400 MHz and 10 W/m² at 10–400 MHz agree with the copy
//     on rfsafetysolutions.com ("ICNIRP Guidelines", reference levels for
//     occupational exposure); 3·10⁻³·f^½ V/m (f in Hz, 400 MHz–2 GHz) and
//     50 W/m² above 2 GHz agree with the action values of Directive
//     2013/35/EU Annex III as published by the Norwegian Labour Inspection
//     Authority (arbeidstilsynet.no, action-value regulations § 12-1). The
//     H-field 1.6/f A/m (which sets the 1–10 MHz limit) was not read.
//   - A later search of stored public copies (the guidelines themselves,
//     ARPANSA RPS S-1 (2021), national texts, ITU-T material) found no
//     verbatim copy of ICNIRP 2020 Table 5 or ICNIRP 1998 Table 6, nor a
//     readable FCC OET Bulletin 65 Supplement B Table 2; only ICNIRP 2020
//     Table 6 (local exposure, not used here) turned up reproduced in a
//     textbook. So the marks stay, now per tier (TierSource).
// [calc] marks a figure computed by hand from the cited formula.

func TestExposureLimitFor(t *testing.T) {
	fcc, i20, i98 := StandardFCC, StandardICNIRP2020, StandardICNIRP1998
	pub, occ := TierPublic, TierOccupational
	tests := []struct {
		name    string
		std     Standard
		tier    Tier
		freqMHz float64
		wantWM2 float64
		relTol  float64
		wantAvg time.Duration
	}{
		// 47 CFR § 1.1310(e)(1) Table 1 (A) occupational/controlled, 6 min.
		{"fcc occ 0.3 MHz: 100 mW/cm²", fcc, occ, 0.3, 1000, 1e-12, 6 * time.Minute},
		{"fcc occ 2 MHz: 100 mW/cm²", fcc, occ, 2, 1000, 1e-12, 6 * time.Minute},
		{"fcc occ 10 MHz: 900/f² = 9 mW/cm²", fcc, occ, 10, 90, 1e-12, 6 * time.Minute},
		{"fcc occ 146 MHz: 1.0 mW/cm²", fcc, occ, 146, 10, 1e-12, 6 * time.Minute},
		{"fcc occ 446 MHz: f/300 = 1.487 mW/cm²", fcc, occ, 446, 14.87, 5e-4, 6 * time.Minute}, // 47 CFR § 1.1310 Table 1 [calc]
		{"fcc occ 2400 MHz: 5 mW/cm²", fcc, occ, 2400, 50, 1e-12, 6 * time.Minute},
		{"fcc occ 100 GHz: 5 mW/cm²", fcc, occ, 100000, 50, 1e-12, 6 * time.Minute},
		// 47 CFR § 1.1310(e)(1) Table 1 (B) general population/uncontrolled, 30 min.
		{"fcc pub 1 MHz: 100 mW/cm²", fcc, pub, 1, 1000, 1e-12, 30 * time.Minute},
		{"fcc pub 2 MHz: 180/f² = 45 mW/cm²", fcc, pub, 2, 450, 1e-12, 30 * time.Minute},
		{"fcc pub 28 MHz: 180/f² = 0.2296 mW/cm²", fcc, pub, 28, 2.296, 5e-4, 30 * time.Minute},
		{"fcc pub 146 MHz: 0.2 mW/cm²", fcc, pub, 146, 2, 1e-12, 30 * time.Minute},
		{"fcc pub 446 MHz: f/1500 = 0.2973 mW/cm²", fcc, pub, 446, 2.973, 5e-4, 30 * time.Minute}, // 47 CFR § 1.1310 Table 1 [calc]
		{"fcc pub 1296 MHz: f/1500 = 0.864 mW/cm²", fcc, pub, 1296, 8.64, 1e-12, 30 * time.Minute},
		{"fcc pub 5800 MHz: 1.0 mW/cm²", fcc, pub, 5800, 10, 1e-12, 30 * time.Minute},
		// ICNIRP 2020 Table 5, 30 min [from memory, not read in the table].
		{"icnirp2020 pub 146 MHz: 2 W/m²", i20, pub, 146, 2, 1e-12, 30 * time.Minute},
		{"icnirp2020 pub 446 MHz: f/200 = 2.23 W/m²", i20, pub, 446, 2.23, 1e-12, 30 * time.Minute}, // ICNIRP 2020 Table 5 [from memory]
		{"icnirp2020 pub 2400 MHz: 10 W/m²", i20, pub, 2400, 10, 1e-12, 30 * time.Minute},
		// [calc] E = 300/10^0.7 = 59.86 V/m → E²/Z0 = 9.51 W/m² (H = 0.22 A/m → 18.2 W/m²).
		{"icnirp2020 pub 10 MHz: E²/Z0 of 300/f^0.7 V/m", i20, pub, 10, 9.51, 2e-3, 30 * time.Minute},
		{"icnirp2020 occ 146 MHz: 10 W/m²", i20, occ, 146, 10, 1e-12, 30 * time.Minute},
		{"icnirp2020 occ 446 MHz: f/40 = 11.15 W/m²", i20, occ, 446, 11.15, 1e-12, 30 * time.Minute},
		{"icnirp2020 occ 10 GHz: 50 W/m²", i20, occ, 10000, 50, 1e-12, 30 * time.Minute},
		// [calc] E = 660/10^0.7 = 131.7 V/m → 46.0 W/m² (H = 0.49 A/m → 90.5 W/m²).
		{"icnirp2020 occ 10 MHz: E²/Z0 of 660/f^0.7 V/m", i20, occ, 10, 46.04, 2e-3, 30 * time.Minute},
		// ICNIRP 1998 Table 7, 6 min [quoted copy: 1999/519/EC Annex III].
		{"icnirp1998 pub 146 MHz: 2 W/m²", i98, pub, 146, 2, 1e-12, 6 * time.Minute},
		{"icnirp1998 pub 446 MHz: f/200", i98, pub, 446, 2.23, 1e-12, 6 * time.Minute},
		{"icnirp1998 pub 1296 MHz: f/200 = 6.48 W/m²", i98, pub, 1296, 6.48, 1e-12, 6 * time.Minute},
		{"icnirp1998 pub 2400 MHz: 10 W/m²", i98, pub, 2400, 10, 1e-12, 6 * time.Minute},
		// [calc] 0.15–1 MHz: E = 87 V/m → E²/Z0 = 20.09 W/m² (H = 0.73/0.5 = 1.46 A/m → 803 W/m²).
		{"icnirp1998 pub 0.5 MHz: E²/Z0 of 87 V/m", i98, pub, 0.5, 20.09, 2e-3, 6 * time.Minute},
		// ICNIRP 1998 Table 6 [from memory, checked in part; see the notes above].
		// [calc] E = 87/√5 = 38.91 V/m → 4.018 W/m² (H = 0.146 A/m → 8.04 W/m²).
		{"icnirp1998 pub 5 MHz: E²/Z0 of 87/f^0.5 V/m", i98, pub, 5, 4.018, 2e-3, 6 * time.Minute},
		{"icnirp1998 occ 146 MHz: 10 W/m²", i98, occ, 146, 10, 1e-12, 6 * time.Minute},
		{"icnirp1998 occ 446 MHz: f/40", i98, occ, 446, 11.15, 1e-12, 6 * time.Minute},
		{"icnirp1998 occ 2400 MHz: 50 W/m²", i98, occ, 2400, 50, 1e-12, 6 * time.Minute},
		// [calc] H = 1.6/5 = 0.32 A/m → Z0·H² = 38.58 W/m² (E = 122 V/m → 39.5 W/m²).
		{"icnirp1998 occ 5 MHz: Z0·H² of 1.6/f A/m", i98, occ, 5, 38.58, 2e-3, 6 * time.Minute},
		// [calc] 68/30^1.05 min = 1.912 min above 10 GHz (note 3 of the quoted copy).
		{"icnirp1998 pub 30 GHz: 10 W/m², 68/f^1.05 min", i98, pub, 30000, 10, 1e-12, time.Duration(1.9124 * float64(time.Minute))},
		// [calc] 68/50^1.05 min = 1.118 min.
		{"icnirp1998 pub 50 GHz: 10 W/m², 68/f^1.05 min", i98, pub, 50000, 10, 1e-12, 67098 * time.Millisecond},
		// Note 2 of the quoted copy: 6 min up to 10 GHz.
		{"icnirp1998 pub 10 GHz: 10 W/m², 6 min", i98, pub, 10000, 10, 1e-12, 6 * time.Minute},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := LimitFor(tc.std, tc.tier, tc.freqMHz)
			if err != nil {
				t.Fatal(err)
			}
			if rel := math.Abs(got.PowerDensityWM2-tc.wantWM2) / tc.wantWM2; rel > tc.relTol {
				t.Errorf("limit = %.6g W/m², want %.6g W/m² (rel. error %.2g > %.2g)", got.PowerDensityWM2, tc.wantWM2, rel, tc.relTol)
			}
			if d := got.Averaging - tc.wantAvg; d > time.Second || d < -time.Second {
				t.Errorf("averaging = %v, want %v", got.Averaging, tc.wantAvg)
			}
		})
	}
}

// TestExposureLimitBandsJoin checks that every limit table is continuous
// where its bands meet: the published tables are built that way, so a band
// edge or formula misremembered would show as a step. The tolerance covers
// the published roundings (e.g. ICNIRP 1998 occupational at 10 MHz, where
// Z0·(0.16 A/m)² = 9.64 W/m² meets 10 W/m²).
func TestExposureLimitBandsJoin(t *testing.T) {
	tables := []struct {
		name  string
		bands []exposureBand
		tol   float64
	}{
		{"fcc occupational", fccOccupationalBands, 1e-9},
		{"fcc public", fccPublicBands, 3e-3}, // 180/1.34² = 100.25 meets 100 mW/cm²
		{"icnirp2020 occupational", icnirp2020OccupationalBands, 0.02},
		{"icnirp2020 public", icnirp2020PublicBands, 0.02},
		{"icnirp1998 occupational", icnirp1998OccupationalBands, 0.04},
		{"icnirp1998 public", icnirp1998PublicBands, 0.01},
	}
	for _, tc := range tables {
		t.Run(tc.name, func(t *testing.T) {
			if tc.bands[0].loMHz != MinFreqMHz || tc.bands[len(tc.bands)-1].hiMHz != MaxFreqMHz {
				t.Errorf("table spans %g–%g MHz, want 0.3–100000", tc.bands[0].loMHz, tc.bands[len(tc.bands)-1].hiMHz)
			}
			for i := 1; i < len(tc.bands); i++ {
				f := tc.bands[i].loMHz
				if tc.bands[i-1].hiMHz != f {
					t.Errorf("gap between bands at %g and %g MHz", tc.bands[i-1].hiMHz, f)
				}
				below, above := tc.bands[i-1].limitWM2(f), tc.bands[i].limitWM2(f)
				if rel := math.Abs(below-above) / above; rel > tc.tol {
					t.Errorf("at %g MHz the limit steps from %.4g to %.4g W/m² (rel. %.2g > %.2g)", f, below, above, rel, tc.tol)
				}
			}
		})
	}
}

func TestTxModeDutyFactor(t *testing.T) {
	// FCC OET Bulletin 65 Supplement B Table 2.
	tests := []struct {
		mode string
		want float64
	}{
		{"fm", 1.0},            // FM voice 100 %
		{"ssb", 0.2},           // conversational SSB 20 %
		{"ssb-processed", 0.5}, // SSB with heavy processing 50 %
		{"cw", 0.4},            // conversational CW 40 %
		{"digital", 1.0},       // FSK/RTTY, AFSK over SSB 100 %
		{"carrier", 1.0},       // carrier 100 %
		{" CW ", 0.4},          // case and spaces ignored
		{"", 1.0},              // unset: worst case, carrier
	}
	for _, tc := range tests {
		t.Run(fmt.Sprintf("%q", tc.mode), func(t *testing.T) {
			got, err := TxMode(tc.mode).DutyFactor()
			if err != nil {
				t.Fatal(err)
			}
			if got != tc.want {
				t.Errorf("duty factor = %g, want %g", got, tc.want)
			}
		})
	}
	if _, err := TxMode("am").DutyFactor(); !errors.Is(err, ErrInput) {
		t.Errorf("unknown mode: err = %v, want ErrInput", err)
	}
}

// onAirBruteForce slides a window of length w across two periods of the
// cycle in 1 s steps and integrates the transmitting time in 1 s cells: an
// independent check of the closed form for cycles given in whole seconds.
func onAirBruteForce(onS, offS, wS int) float64 {
	period := onS + offS
	best := 0
	for start := 0; start < 2*period; start++ {
		on := 0
		for s := start; s < start+wS; s++ {
			if s%period < onS {
				on++
			}
		}
		best = max(best, on)
	}
	return float64(best) / float64(wS)
}

func TestWorstCaseOnAirFraction(t *testing.T) {
	tests := []struct {
		name          string
		on, off, wind time.Duration
		want, tol     float64
	}{
		// OET Bulletin 65 Supplement B worked examples, worst-case window.
		{"7 on 7 off, 6 min: all on", 7 * time.Minute, 7 * time.Minute, 6 * time.Minute, 1, 1e-12},
		{"7 on 7 off, 30 min: 16 of 30", 7 * time.Minute, 7 * time.Minute, 30 * time.Minute, 16.0 / 30, 1e-12},
		{"15 s every 2 min, 6 min", 15 * time.Second, 105 * time.Second, 6 * time.Minute, 0.125, 1e-12},
		{"15 s every 2 min, 30 min", 15 * time.Second, 105 * time.Second, 30 * time.Minute, 0.125, 1e-12},
		{"5 on 5 off, 6 min: 5 of 6", 5 * time.Minute, 5 * time.Minute, 6 * time.Minute, 5.0 / 6, 1e-12},
		{"5 on 5 off, 30 min: half", 5 * time.Minute, 5 * time.Minute, 30 * time.Minute, 0.5, 1e-12},
		{"2 on 1 off, 6 min", 2 * time.Minute, time.Minute, 6 * time.Minute, 2.0 / 3, 1e-12},                          // [calc]
		{"2 on 1 off, 30 min", 2 * time.Minute, time.Minute, 30 * time.Minute, 2.0 / 3, 1e-12},                        // [calc]
		{"no listening: continuous", time.Minute, 0, 6 * time.Minute, 1, 0},                                           // [calc]
		{"1 h on 1 h off, 30 min", time.Hour, time.Hour, 30 * time.Minute, 1, 0},                                      // [calc]
		{"4 on 9 off, 30 min: 2·4 + min(4, 4)", 4 * time.Minute, 9 * time.Minute, 30 * time.Minute, 12.0 / 30, 1e-12}, // [calc]
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := WorstCaseOnAirFraction(tc.on, tc.off, tc.wind)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-tc.want) > tc.tol {
				t.Errorf("fraction = %.6f, want %.6f", got, tc.want)
			}
		})
	}

	// Against a brute-force slide of the window, for many cycles.
	for _, c := range []struct{ on, off, w int }{
		{7, 7, 60}, {13, 29, 60}, {45, 15, 360}, {37, 83, 360}, {1, 1, 7}, {90, 30, 100}, {11, 200, 300}, {60, 13, 180},
	} {
		got, err := WorstCaseOnAirFraction(time.Duration(c.on)*time.Second, time.Duration(c.off)*time.Second, time.Duration(c.w)*time.Second)
		if err != nil {
			t.Fatal(err)
		}
		if want := onAirBruteForce(c.on, c.off, c.w); math.Abs(got-want) > 1e-12 {
			t.Errorf("on %d s off %d s window %d s: fraction = %.6f, brute force %.6f", c.on, c.off, c.w, got, want)
		}
	}

	for _, bad := range []struct {
		name          string
		on, off, wind time.Duration
	}{
		{"zero on", 0, time.Minute, time.Minute},
		{"negative off", time.Minute, -time.Second, time.Minute},
		{"zero window", time.Minute, time.Minute, 0},
		{"overflowing cycle", math.MaxInt64 - 5, 10, time.Minute},
	} {
		if _, err := WorstCaseOnAirFraction(bad.on, bad.off, bad.wind); !errors.Is(err, ErrInput) {
			t.Errorf("%s: err = %v, want ErrInput", bad.name, err)
		}
	}
}

func TestEvaluateExposureAveraging(t *testing.T) {
	// OET Bulletin 65 Supplement B (ed. 97-01) worked examples, 0 dBi and
	// no feedline loss, so the EIRP does not matter here.
	tests := []struct {
		name             string
		in               Input
		wantOcc, wantPub float64
		tol              float64 // W
	}{
		{"1500 W SSB 7 on 7 off", Input{PowerW: 1500, FreqMHz: 14.2, Mode: ModeSSB, OnTime: 7 * time.Minute, OffTime: 7 * time.Minute}, 300, 160, 1e-9},
		{"500 W CW 15 s every 2 min", Input{PowerW: 500, FreqMHz: 7.03, Mode: ModeCW, OnTime: 15 * time.Second, OffTime: 105 * time.Second}, 25, 25, 1e-9},
		{"250 W FM 5 on 5 off", Input{PowerW: 250, FreqMHz: 146.52, Mode: ModeFM, OnTime: 5 * time.Minute, OffTime: 5 * time.Minute}, 208.333, 125, 1e-3},
		{"1500 W SSB 2 on 1 off", Input{PowerW: 1500, FreqMHz: 14.2, Mode: ModeSSB, OnTime: 2 * time.Minute, OffTime: time.Minute}, 200, 200, 1e-9}, // [calc]
		// [calc] 100 W × 0.4 × 0.5 = 20 W: a plain fraction applies to both tiers.
		{"100 W CW tx 50 %", Input{PowerW: 100, FreqMHz: 50.1, Mode: ModeCW, TxFraction: 0.5}, 20, 20, 1e-9},
		// [calc] duty override 0.3 replaces FM's 1.0: 100 W × 0.3 = 30 W.
		{"duty override", Input{PowerW: 100, FreqMHz: 50.1, Mode: ModeFM, DutyFactor: 0.3}, 30, 30, 1e-9},
		// ICNIRP 2020 averages both tiers over 30 min: 7 on 7 off → 16/30 each [calc].
		{"icnirp2020 SSB 7 on 7 off", Input{PowerW: 1500, FreqMHz: 14.2, Mode: ModeSSB, OnTime: 7 * time.Minute, OffTime: 7 * time.Minute, Standard: StandardICNIRP2020}, 160, 160, 1e-9},
		// ICNIRP 1998 averages both over 6 min: 5 on 5 off → 5/6 each [calc].
		{"icnirp1998 FM 5 on 5 off", Input{PowerW: 250, FreqMHz: 146.52, Mode: ModeFM, OnTime: 5 * time.Minute, OffTime: 5 * time.Minute, Standard: StandardICNIRP1998}, 208.333, 208.333, 1e-3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rep, err := Evaluate(tc.in)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(rep.AvgPowerOccupationalW-tc.wantOcc) > tc.tol {
				t.Errorf("occupational/controlled average = %.4f W, want %.4f W", rep.AvgPowerOccupationalW, tc.wantOcc)
			}
			if math.Abs(rep.AvgPowerPublicW-tc.wantPub) > tc.tol {
				t.Errorf("public/uncontrolled average = %.4f W, want %.4f W", rep.AvgPowerPublicW, tc.wantPub)
			}
		})
	}
}

func TestEvaluateExposureDistances(t *testing.T) {
	// Computed [calc], continuous FM, F = 2.56, 47 CFR § 1.1310 Table 1 limits,
	// R = √(2.56·EIRP/(4π·S)) (OET Bulletin 65 eq. 6); figures rounded to cm.
	tests := []struct {
		name             string
		powerW, freqMHz  float64
		wantOcc, wantPub float64
		tol              float64 // m
	}{
		{"146 MHz 50 W 2.15 dBi", 50, 146, 1.29, 2.89, 0.006},
		{"146 MHz 5 W 2.15 dBi", 5, 146, 0.41, 0.91, 0.006},
		{"446 MHz 50 W 2.15 dBi", 50, 446, 1.06, 2.37, 0.006},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rep, err := Evaluate(Input{PowerW: tc.powerW, GainDBi: 2.15, FreqMHz: tc.freqMHz, Mode: ModeFM})
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(rep.DistanceOccupationalM-tc.wantOcc) > tc.tol {
				t.Errorf("occupational distance = %.3f m, want %.2f m", rep.DistanceOccupationalM, tc.wantOcc)
			}
			if math.Abs(rep.DistancePublicM-tc.wantPub) > tc.tol {
				t.Errorf("public distance = %.3f m, want %.2f m", rep.DistancePublicM, tc.wantPub)
			}
			// The density at the compliance distance is the limit (OET 65 eq. 6).
			avgEIRP := rep.EIRPW * rep.DutyFactor * rep.TxFractionPublic
			if s := farFieldPowerDensityWM2(avgEIRP, rep.DistancePublicM, rep.ReflectionFactor); math.Abs(s-rep.LimitPublicWM2) > 1e-9 {
				t.Errorf("density at the public distance = %g W/m², want the limit %g W/m²", s, rep.LimitPublicWM2)
			}
		})
	}
}

func TestEvaluateExposureFeedlineAndReflection(t *testing.T) {
	// [calc] 100 W, 6 dBi, 3 dB feedline: EIRP = 100·10^0.3 = 199.5 W.
	base := Input{PowerW: 100, GainDBi: 6, FeedlineLossDB: 3, FreqMHz: 146, Mode: ModeFM}
	rep, err := Evaluate(base)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rep.EIRPW-199.526) > 1e-3 {
		t.Errorf("EIRP = %.3f W, want 199.526 W", rep.EIRPW)
	}
	// [calc] R = √(F·EIRP/(4π·2 W/m²)) for F = 1, 2.56, 4 (OET Bulletin 65 eqs. 3–6).
	for _, tc := range []struct {
		f, wantM float64
	}{{1, 2.8176}, {2.56, 4.5082}, {4, 5.6352}} {
		in := base
		in.ReflectionFactor = tc.f
		rep, err := Evaluate(in)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(rep.DistancePublicM-tc.wantM) > 1e-4 {
			t.Errorf("F = %g: public distance = %.4f m, want %.4f m", tc.f, rep.DistancePublicM, tc.wantM)
		}
	}
}

func TestICNIRPComparison446(t *testing.T) {
	// At 446 MHz the ICNIRP 2020 Table 5 public level f/200 = 2.23 W/m²
	// [mem: verify] is stricter than the FCC's f/1500 mW/cm² = 2.97 W/m², so
	// its distance is longer by √(2.973/2.23) = 1.1547 [calc].
	in := Input{PowerW: 50, GainDBi: 2.15, FreqMHz: 446, Mode: ModeFM}
	fcc, err := Evaluate(in)
	if err != nil {
		t.Fatal(err)
	}
	in.Standard = StandardICNIRP2020
	icn, err := Evaluate(in)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(icn.LimitPublicWM2-2.23) > 1e-9 || math.Abs(fcc.LimitPublicWM2-2.9733) > 1e-4 {
		t.Errorf("public limits = %.4f (icnirp2020), %.4f (fcc) W/m², want 2.23, 2.9733", icn.LimitPublicWM2, fcc.LimitPublicWM2)
	}
	if ratio := icn.DistancePublicM / fcc.DistancePublicM; math.Abs(ratio-1.1547) > 1e-4 {
		t.Errorf("icnirp2020/fcc public distance ratio = %.4f, want 1.1547", ratio)
	}
	if icn.Standard != StandardICNIRP2020 || fcc.Standard != StandardFCC {
		t.Errorf("standards reported %q and %q", icn.Standard, fcc.Standard)
	}
}

func TestExemptionThresholdERPW(t *testing.T) {
	// 47 CFR § 1.1307(b)(3)(i)(C) table; checks computed from it [calc].
	tests := []struct {
		name             string
		freqMHz, distM   float64
		wantW, relTolErr float64
	}{
		{"146 MHz 1 m: 3.83 R²", 146, 1, 3.83, 1e-3},
		{"146 MHz 2 m", 146, 2, 15.3, 2e-3},
		{"146 MHz 5 m", 146, 5, 95.8, 1e-3},
		{"446 MHz 1 m: 0.0128 R² f", 446, 1, 5.71, 1e-3},
		{"1 MHz 100 m: 1920 R²", 1, 100, 1.92e7, 1e-9},                      // [calc]
		{"14 MHz 10 m: 3450 R²/f²", 14, 10, 1760.2, 1e-4},                   // [calc] 345000/196
		{"2400 MHz 1 m: 19.2 R²", 2400, 1, 19.2, 1e-9},                      // [calc]
		{"30 MHz edge: 3.83 R²", 30, 3, 34.47, 1e-9},                        // [calc] band 30–300
		{"1500 MHz edge: 19.2 R²", 1500, 1, 19.2, 1e-9},                     // [calc] band 1500–100000
		{"100 GHz: 19.2 R²", 100000, 0.5, 4.8, 1e-9},                        // [calc]
		{"1299.9 MHz: 0.0128 R² f", 1299.9, 1, 16.63872, 1e-9},              // [calc]
		{"1.34 MHz edge: 3450 R²/f²", 1.34, 40, 3450 * 1600 / 1.7956, 1e-9}, // [calc]
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ExemptionThresholdERPW(tc.freqMHz, tc.distM)
			if err != nil {
				t.Fatal(err)
			}
			if rel := math.Abs(got-tc.wantW) / tc.wantW; rel > tc.relTolErr {
				t.Errorf("threshold = %.5g W, want %.5g W", got, tc.wantW)
			}
		})
	}
	// Inside λ/2π the rule does not apply: 1 MHz → λ/2π = 47.7 m [calc].
	if _, err := ExemptionThresholdERPW(1, 10); !errors.Is(err, ErrInput) {
		t.Errorf("1 MHz at 10 m: err = %v, want ErrInput", err)
	}
}

func TestExemptAtAndBeyond(t *testing.T) {
	tests := []struct {
		name          string
		freqMHz, erpW float64
		wantM, tolM   float64
	}{
		// [calc] √(50/3.83) = 3.613 m (§ 1.1307(b)(3)(i)(C), 30–300 MHz).
		{"146 MHz 50 W ERP", 146, 50, 3.6131, 1e-4},
		// [calc] √(50/(0.0128·446)) = 2.9594 m.
		{"446 MHz 50 W ERP", 446, 50, 2.9594, 1e-4},
		// [calc] √(1/1920) = 0.023 m < λ/2π = 299.792458/(2π·1) = 47.71 m.
		{"1 MHz 1 W: λ/2π floor", 1, 1, 47.7135, 1e-4},
		// [calc] 14 MHz: 14·√(1000/3450) = 7.537 m > λ/2π = 3.408 m.
		{"14 MHz 1 kW", 14, 1000, 7.5373, 1e-4},
		// [calc] 0 W: only the floor λ/2π = 0.3268 m at 146 MHz.
		{"zero power", 146, 0, 0.32680, 1e-5},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ExemptBeyondM(tc.freqMHz, tc.erpW)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-tc.wantM) > tc.tolM {
				t.Errorf("exempt beyond %.5f m, want %.5f m", got, tc.wantM)
			}
			// Exempt at that distance and beyond; not just inside it when
			// the power, not λ/2π, sets it.
			if ok, err := exemptAt(tc.freqMHz, tc.erpW, got*(1+1e-9)); err != nil || !ok {
				t.Errorf("exemptAt(%.4f m) = %v, %v; want true", got, ok, err)
			}
			if got > NearFieldBoundaryM(tc.freqMHz)*1.001 {
				if ok, err := exemptAt(tc.freqMHz, tc.erpW, got*0.999); err != nil || ok {
					t.Errorf("exemptAt(%.4f m) = %v, %v; want false", got*0.999, ok, err)
				}
			}
		})
	}
	if _, err := ExemptBeyondM(146, -1); !errors.Is(err, ErrInput) {
		t.Errorf("negative ERP: err = %v, want ErrInput", err)
	}
	if _, err := exemptAt(146, -1, 5); !errors.Is(err, ErrInput) {
		t.Errorf("exemptAt negative ERP: err = %v, want ErrInput", err)
	}
	if _, err := ExemptBeyondM(0.1, 1); !errors.Is(err, ErrInput) {
		t.Errorf("0.1 MHz: err = %v, want ErrInput", err)
	}
}

func TestEvaluateExposureExemption(t *testing.T) {
	// 50 W FM into 2.15 dBi at 146 MHz: EIRP 82.03 W, ERP 50.02 W [calc]
	// (1.64 rounds 10^0.215 = 1.6406); exempt beyond √(50.02/3.83) = 3.614 m.
	rep, err := Evaluate(Input{PowerW: 50, GainDBi: 2.15, FreqMHz: 146, Mode: ModeFM})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rep.ERPW-50.018) > 1e-3 || math.Abs(rep.ExemptBeyondM-3.6138) > 1e-3 {
		t.Errorf("ERP %.3f W, exempt beyond %.4f m; want 50.018 W, 3.6138 m", rep.ERPW, rep.ExemptBeyondM)
	}
	// 0 dBi, 3 dB feedline: ERP = 100·0.5/1.64 = 30.5 W is less than the 100 W
	// available, so the exemption uses 100 W: √(100/3.83) = 5.110 m [calc].
	rep, err = Evaluate(Input{PowerW: 100, FeedlineLossDB: 3.0103, FreqMHz: 146, Mode: ModeFM})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rep.ExemptBeyondM-5.1098) > 1e-3 {
		t.Errorf("exempt beyond %.4f m, want 5.1098 m", rep.ExemptBeyondM)
	}
	// The exemption averages over the 30-min window of § 1.1310 (B):
	// 250 W FM 5 on 5 off, 0 dBi → max(125/1.64, 125) = 125 W → 5.713 m [calc].
	rep, err = Evaluate(Input{PowerW: 250, FreqMHz: 146, Mode: ModeFM, OnTime: 5 * time.Minute, OffTime: 5 * time.Minute})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rep.ExemptBeyondM-5.7130) > 1e-3 {
		t.Errorf("exempt beyond %.4f m, want 5.7130 m", rep.ExemptBeyondM)
	}
	// § 1.1307 is a US rule: under the ICNIRP limits there is no exemption
	// distance and no ERP for it (47 CFR § 1.1307 applies to FCC licensees).
	for _, std := range []Standard{StandardICNIRP2020, StandardICNIRP1998} {
		rep, err = Evaluate(Input{PowerW: 250, FreqMHz: 146, Mode: ModeFM, Standard: std})
		if err != nil {
			t.Fatal(err)
		}
		if rep.ExemptBeyondM != 0 || rep.ERPW != 0 {
			t.Errorf("%s: exempt beyond %g m, ERP %g W; want neither", std, rep.ExemptBeyondM, rep.ERPW)
		}
	}
}

func TestNearFieldBoundaryM(t *testing.T) {
	// [calc] λ/2π = c/(2π f), c = 299792458 m/s.
	for _, tc := range []struct{ freqMHz, wantM float64 }{
		{146, 0.326802}, {446, 0.106981}, {1, 47.71345}, {3.5, 13.63241},
	} {
		if got := NearFieldBoundaryM(tc.freqMHz); math.Abs(got-tc.wantM) > 1e-5*tc.wantM {
			t.Errorf("λ/2π at %g MHz = %.6f m, want %.6f m", tc.freqMHz, got, tc.wantM)
		}
	}
}

func TestFarFieldPowerDensity(t *testing.T) {
	// [calc] S = F·EIRP/(4πR²), OET Bulletin 65 eqs. 3–6.
	for _, tc := range []struct{ eirpW, distM, f, want float64 }{
		{100, 10, 1, 0.0795775},
		{100, 10, 2.56, 0.2037183},
		{1000, 3, 4, 35.367765},
	} {
		if got := farFieldPowerDensityWM2(tc.eirpW, tc.distM, tc.f); math.Abs(got-tc.want) > 1e-6*tc.want {
			t.Errorf("S(%g W, %g m, F=%g) = %.7f W/m², want %.7f", tc.eirpW, tc.distM, tc.f, got, tc.want)
		}
	}
}

func TestKeepOutRadiusM(t *testing.T) {
	// [calc] √(R² − (h_a − h_p)²) when R > |h_a − h_p|, else 0.
	tests := []struct {
		name               string
		compM, antM, headM float64
		want, tol          float64
	}{
		{"3 m mast, R 2.89", 2.89, 3, 2, 2.7115, 1e-4},
		{"3 m mast, R 1.29", 1.29, 3, 2, 0.8149, 1e-4},
		{"antenna higher than R", 2.89, 10, 2, 0, 0},
		{"R equals height difference", 3, 5, 2, 0, 0},
		{"antenna at head height", 2.5, 2, 2, 2.5, 1e-12},
		// A standing person spans 0–2 m: an antenna at or below head height
		// is level with some part of the body, so the whole distance counts.
		{"antenna below head", 2.5, 0.5, 2, 2.5, 0},
		{"antenna on the ground", 2.89, 0, 2, 2.89, 0},
		{"antenna just above head", 2.5, 2.1, 2, 2.4980, 1e-4}, // √(2.5² − 0.1²)
		{"R just above the height difference", 3 + 1e-12, 5, 2, 0, 1e-5},
		{"negative distance", -1, 2, 2, 0, 0},
		{"zero distance", 0, 2, 2, 0, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := KeepOutRadiusM(tc.compM, tc.antM, tc.headM); math.Abs(got-tc.want) > tc.tol {
				t.Errorf("keep-out = %.4f m, want %.4f m", got, tc.want)
			}
		})
	}

	// Through Evaluate: 50 W FM 2.15 dBi at 146 MHz, R = 2.89 / 1.29 m.
	for _, tc := range []struct {
		name             string
		antM, headM      float64
		wantPub, wantOcc float64
	}{
		{"3 m mast, 2 m head", 3, 0, 2.7121, 0.8192},    // [calc] default head 2 m
		{"10 m mast: out of reach", 10, 0, 0, 0},        // antenna higher than both distances
		{"antenna on the ground", 0, 0, 2.8906, 1.2927}, // whole compliance distances [calc]
		{"3 m mast, 1.2 m head", 3, 1.2, 2.2617, 0},     // [calc] √(2.8906² − 1.8²); 1.2927 < 1.8
	} {
		t.Run(tc.name, func(t *testing.T) {
			rep, err := Evaluate(Input{PowerW: 50, GainDBi: 2.15, FreqMHz: 146, Mode: ModeFM, AntennaHeightM: tc.antM, HeadHeightM: tc.headM})
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(rep.KeepoutPublicM-tc.wantPub) > 1e-3 || math.Abs(rep.KeepoutOccupationalM-tc.wantOcc) > 1e-3 {
				t.Errorf("keep-out public %.4f m, occupational %.4f m; want %.4f, %.4f", rep.KeepoutPublicM, rep.KeepoutOccupationalM, tc.wantPub, tc.wantOcc)
			}
		})
	}
}

func TestEvaluateExposureInvalid(t *testing.T) {
	good := Input{PowerW: 50, GainDBi: 2.15, FreqMHz: 146.52, Mode: ModeFM, AntennaHeightM: 3}
	tests := []struct {
		name   string
		modify func(*Input)
		want   string // a fragment the message must contain
	}{
		{"negative power", func(in *Input) { in.PowerW = -5 }, "power -5 W"},
		{"zero power", func(in *Input) { in.PowerW = 0 }, "power 0 W"},
		{"NaN power", func(in *Input) { in.PowerW = math.NaN() }, "power is NaN"},
		{"infinite gain", func(in *Input) { in.GainDBi = math.Inf(1) }, "antenna gain is +Inf"},
		{"negative feedline loss", func(in *Input) { in.FeedlineLossDB = -1 }, "feedline loss -1 dB"},
		{"frequency too low", func(in *Input) { in.FreqMHz = 0.1 }, "frequency 0.1 MHz"},
		{"frequency too high", func(in *Input) { in.FreqMHz = 100001 }, "frequency 100001 MHz"},
		{"zero frequency", func(in *Input) { in.FreqMHz = 0 }, "frequency 0 MHz"},
		{"unknown mode", func(in *Input) { in.Mode = "am" }, `unknown mode "am"`},
		{"duty above 1", func(in *Input) { in.DutyFactor = 1.5 }, "duty factor 1.5"},
		{"negative duty", func(in *Input) { in.DutyFactor = -0.2 }, "duty factor -0.2"},
		{"unknown standard", func(in *Input) { in.Standard = "etsi" }, `unknown exposure standard "etsi"`},
		{"reflection 2", func(in *Input) { in.ReflectionFactor = 2 }, "reflection factor 2"},
		{"tx fraction above 1", func(in *Input) { in.TxFraction = 1.2 }, "transmit fraction 1.2"},
		{"negative tx fraction", func(in *Input) { in.TxFraction = -0.5 }, "transmit fraction -0.5"},
		{"fraction and cycle", func(in *Input) { in.TxFraction = 0.5; in.OnTime = time.Minute }, "not both"},
		{"negative on time", func(in *Input) { in.OnTime = -time.Minute; in.OffTime = time.Minute }, "must not be negative"},
		{"negative off time", func(in *Input) { in.OnTime = time.Minute; in.OffTime = -time.Minute }, "must not be negative"},
		{"off time without on time", func(in *Input) { in.OffTime = time.Minute }, "transmit time 0s"},
		{"negative antenna height", func(in *Input) { in.AntennaHeightM = -1 }, "antenna height -1 m"},
		{"negative head height", func(in *Input) { in.HeadHeightM = -2 }, "head height -2 m"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			in := good
			tc.modify(&in)
			_, err := Evaluate(in)
			if !errors.Is(err, ErrInput) {
				t.Fatalf("err = %v, want one wrapping ErrInput", err)
			}
			if msg := err.Error(); !strings.Contains(msg, tc.want) || msg != strings.ToLower(msg[:1])+msg[1:] {
				t.Errorf("message %q should start lowercase and contain %q", msg, tc.want)
			}
		})
	}
	if _, err := Evaluate(good); err != nil {
		t.Fatalf("the valid base input fails: %v", err)
	}
	if _, err := LimitFor(StandardFCC, Tier(7), 146); !errors.Is(err, ErrInput) {
		t.Errorf("unknown tier: err = %v", err)
	}
	if _, err := LimitFor("who", TierPublic, 146); !errors.Is(err, ErrInput) {
		t.Errorf("unknown standard: err = %v", err)
	}
	// An empty or capitalised name reads as by ParseStandard.
	for _, name := range []Standard{"", "FCC", " fcc "} {
		if lim, err := LimitFor(name, TierPublic, 146); err != nil || lim.PowerDensityWM2 != 2 {
			t.Errorf("standard %q: limit %v, err %v; want the FCC's 2 W/m² at 146 MHz", name, lim, err) // § 1.1310 Table 1: 0.2 mW/cm²
		}
	}
}

func TestExposureReportJSON(t *testing.T) {
	// The JSON field names `mastlink exposure --format json` promises
	// scripts, plus the exemption fields.
	contract := []string{
		"standard", "freq_mhz", "eirp_w", "duty_factor", "avg_power_public_w", "avg_power_occupational_w",
		"limit_public_w_m2", "limit_occupational_w_m2", "distance_public_m", "distance_occupational_m",
		"keepout_public_m", "keepout_occupational_m", "cautions", "exempt_beyond_m", "erp_w", "near_field_m",
	}
	rep, err := Evaluate(Input{PowerW: 5, GainDBi: 2.15, FreqMHz: 446, Mode: ModeFM})
	if err != nil {
		t.Fatal(err)
	}
	raw, err := json.Marshal(rep)
	if err != nil {
		t.Fatal(err)
	}
	var fields map[string]any
	if err := json.Unmarshal(raw, &fields); err != nil {
		t.Fatal(err)
	}
	for _, name := range contract {
		if _, ok := fields[name]; !ok {
			t.Errorf("JSON lacks field %q", name)
		}
	}
	if fields["standard"] != "fcc" || fields["mode"] != "fm" {
		t.Errorf("standard %v, mode %v; want fcc, fm", fields["standard"], fields["mode"])
	}
	if !reflect.DeepEqual(rep.Cautions, Cautions()) || len(rep.Cautions) == 0 {
		t.Errorf("cautions = %q, want Cautions()", rep.Cautions)
	}
	// Every caution topic is present.
	all := strings.ToLower(strings.Join(rep.Cautions, " "))
	for _, topic := range []string{"λ/2π", "not a measurement", "local rules", "yourself", "power lines", "guy", "lightning"} {
		if !strings.Contains(all, topic) {
			t.Errorf("cautions lack %q", topic)
		}
	}
	// Callers cannot change the package's cautions through the slice.
	rep.Cautions[0] = "changed"
	if Cautions()[0] == "changed" {
		t.Error("Cautions shares its backing array")
	}
}

// exposureRequireCrossChecks reports whether MASTLINK_REQUIRE_CROSSCHECKS=1 makes a
// missing reference tool a failure instead of a skip.
func exposureRequireCrossChecks() bool { return os.Getenv("MASTLINK_REQUIRE_CROSSCHECKS") == "1" }

func TestKeepOutCircle(t *testing.T) {
	center := orb.Point{10.12, 40.02} // an arbitrary point at 40° N
	for _, radiusM := range []float64{0.8, 2.9, 50, 1000} {
		poly, err := KeepOutCircle(center, radiusM)
		if err != nil {
			t.Fatal(err)
		}
		if len(poly) != 1 {
			t.Fatalf("r = %g m: %d rings, want 1", radiusM, len(poly))
		}
		ring := poly[0]
		if len(ring) != KeepOutCircleVertices+1 || ring[0] != ring[len(ring)-1] {
			t.Fatalf("r = %g m: ring of %d points, closed %v; want %d points, closed", radiusM, len(ring), ring[0] == ring[len(ring)-1], KeepOutCircleVertices+1)
		}
		if ring.Orientation() != orb.CCW {
			t.Errorf("r = %g m: ring is not counter-clockwise (RFC 7946 §3.1.6)", radiusM)
		}
		if !ring.Bound().Contains(center) {
			t.Errorf("r = %g m: ring does not surround the centre", radiusM)
		}
	}

	if p, err := KeepOutCircle(center, 0); err != nil || p != nil {
		t.Errorf("radius 0: %v, %v; want nil, nil", p, err)
	}
	for _, bad := range []struct {
		name    string
		c       orb.Point
		radiusM float64
	}{
		{"negative radius", center, -1},
		{"radius too large", center, 20000},
		{"NaN radius", center, math.NaN()},
		{"latitude near pole", orb.Point{0, 89.5}, 10},
		{"longitude out of range", orb.Point{200, 0}, 10},
	} {
		if _, err := KeepOutCircle(bad.c, bad.radiusM); !errors.Is(err, ErrInput) {
			t.Errorf("%s: err = %v, want ErrInput", bad.name, err)
		}
	}
}

// TestKeepOutCircleGeodSolve checks the vertices' distances and bearings
// from the centre against GeographicLib's GeodSolve (WGS84 geodesics).
func TestKeepOutCircleGeodSolve(t *testing.T) {
	path, err := exec.LookPath("GeodSolve")
	if err != nil {
		if exposureRequireCrossChecks() {
			t.Fatal("GeodSolve (Debian geographiclib-tools) not found and MASTLINK_REQUIRE_CROSSCHECKS=1")
		}
		t.Skip("GeodSolve (Debian geographiclib-tools) not found; install it to run this cross-check")
	}
	tests := []struct {
		name    string
		center  orb.Point
		radiusM float64
		tolM    float64 // GeographicLib GeodSolve 2.1.2 reference; vertices are geodesic ends (Karney), so only rounding remains
		aziTol  float64 // degrees
	}{
		{"3 m at 40° N", orb.Point{10.12, 40.02}, 3, 1e-6, 1e-5}, // 1e-12° of printed position is 2e-6° of bearing over 3 m
		{"60 m at 0°", orb.Point{12.5, 0}, 60, 1e-6, 1e-6},
		{"250 m at 65° S", orb.Point{170.1, -65.3}, 250, 1e-6, 1e-6},
		{"2 km at 52° N", orb.Point{5.3, 52.1}, 2000, 1e-6, 1e-6},
		{"10 km at 80° N", orb.Point{-40, 80}, 10000, 1e-6, 1e-6},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			poly, err := KeepOutCircle(tc.center, tc.radiusM)
			if err != nil {
				t.Fatal(err)
			}
			ring := poly[0][:KeepOutCircleVertices]
			var in strings.Builder
			for _, p := range ring {
				fmt.Fprintf(&in, "%.12f %.12f %.12f %.12f\n", tc.center[1], tc.center[0], p[1], p[0])
			}
			cmd := exec.Command(path, "-i", "-p", "9")
			cmd.Stdin = strings.NewReader(in.String())
			out, err := cmd.Output()
			if err != nil {
				t.Fatalf("GeodSolve: %v", err)
			}
			lines := strings.Split(strings.TrimSpace(string(out)), "\n")
			if len(lines) != len(ring) {
				t.Fatalf("GeodSolve gave %d lines for %d vertices", len(lines), len(ring))
			}
			var maxDistErr, maxAziErr float64
			for i, line := range lines {
				f := strings.Fields(line)
				azi, err1 := strconv.ParseFloat(f[0], 64)
				s12, err2 := strconv.ParseFloat(f[2], 64)
				if err1 != nil || err2 != nil {
					t.Fatalf("GeodSolve line %q", line)
				}
				maxDistErr = max(maxDistErr, math.Abs(s12-tc.radiusM))
				if math.Abs(s12-tc.radiusM) > tc.tolM {
					t.Errorf("vertex %d: geodesic distance %.6f m, want %.6f ± %g m", i, s12, tc.radiusM, tc.tolM)
				}
				wantAzi := -float64(i) * 5
				d := math.Abs(math.Remainder(azi-wantAzi, 360))
				maxAziErr = max(maxAziErr, d)
				if d > tc.aziTol {
					t.Errorf("vertex %d: azimuth %.4f°, want %.1f°", i, azi, wantAzi)
				}
			}
			t.Logf("largest errors against GeodSolve: %.3g m in distance, %.3g° in azimuth", maxDistErr, maxAziErr)
		})
	}
}

// FuzzEvaluateExposure feeds arbitrary inputs and checks that the function
// never panics, that every error wraps ErrInput, and that a report
// obeys the physics: non-negative figures, keep-out no larger than the
// distance, and the occupational distance not beyond the public one where
// the limits' ratio covers the windows' ratio (the worst-case on-time in a
// window never shrinks as the window grows, so frac_occ·W_occ ≤ frac_pub·W_pub).
func FuzzEvaluateExposure(f *testing.F) {
	// Seeds: the worked examples of the tests above.
	f.Add(50.0, 2.15, 0.0, 146.52, "fm", 0.0, 0.0, int64(0), int64(0), "fcc", 0.0, 3.0, 0.0)
	f.Add(1500.0, 0.0, 0.0, 14.2, "ssb", 0.0, 0.0, int64(7*time.Minute), int64(7*time.Minute), "fcc", 2.56, 10.0, 2.0)
	f.Add(500.0, 0.0, 0.5, 7.03, "cw", 0.0, 0.0, int64(15*time.Second), int64(105*time.Second), "icnirp1998", 4.0, 0.0, 1.7)
	f.Add(250.0, 6.0, 1.2, 446.0, "digital", 0.3, 0.5, int64(0), int64(0), "icnirp2020", 1.0, 1.0, 0.0)
	f.Add(-1.0, 0.0, 0.0, 0.1, "am", 2.0, 3.0, int64(-1), int64(-1), "x", 3.0, -1.0, -1.0)
	f.Fuzz(func(t *testing.T, powerW, gainDBi, lossDB, freqMHz float64, mode string, duty, frac float64, onNS, offNS int64, std string, refl, antM, headM float64) {
		in := Input{
			PowerW: powerW, GainDBi: gainDBi, FeedlineLossDB: lossDB, FreqMHz: freqMHz,
			Mode: TxMode(mode), DutyFactor: duty, TxFraction: frac,
			OnTime: time.Duration(onNS), OffTime: time.Duration(offNS),
			Standard: Standard(std), ReflectionFactor: refl, AntennaHeightM: antM, HeadHeightM: headM,
		}
		rep, err := Evaluate(in)
		if err != nil {
			if !errors.Is(err, ErrInput) {
				t.Fatalf("error %v does not wrap ErrInput", err)
			}
			return
		}
		for name, v := range map[string]float64{
			"eirp": rep.EIRPW, "avg public": rep.AvgPowerPublicW, "avg occupational": rep.AvgPowerOccupationalW,
			"distance public": rep.DistancePublicM, "distance occupational": rep.DistanceOccupationalM,
			"keep-out public": rep.KeepoutPublicM, "keep-out occupational": rep.KeepoutOccupationalM,
			"exempt beyond": rep.ExemptBeyondM,
		} {
			if math.IsNaN(v) || v < 0 {
				t.Fatalf("%s = %g for %+v", name, v, in)
			}
		}
		if rep.KeepoutPublicM > rep.DistancePublicM || rep.KeepoutOccupationalM > rep.DistanceOccupationalM {
			t.Fatalf("keep-out beyond the compliance distance: %+v", rep)
		}
		// Where the occupational limit exceeds the public one by at least the
		// ratio of the averaging windows (FCC from 3 MHz; ICNIRP everywhere),
		// the occupational distance cannot exceed the public one.
		windows := rep.AveragingPublicS / rep.AveragingOccupationalS
		if rep.LimitOccupationalWM2 >= rep.LimitPublicWM2*windows && rep.DistanceOccupationalM > rep.DistancePublicM*(1+1e-9) && !math.IsInf(rep.DistancePublicM, 1) {
			t.Fatalf("occupational distance %g m beyond public %g m for %+v", rep.DistanceOccupationalM, rep.DistancePublicM, in)
		}
		if rep.TxFractionPublic <= 0 || rep.TxFractionPublic > 1 || rep.TxFractionOccupational <= 0 || rep.TxFractionOccupational > 1 {
			t.Fatalf("on-air fractions %g, %g outside (0, 1]", rep.TxFractionPublic, rep.TxFractionOccupational)
		}
	})
}

func BenchmarkEvaluateExposure(b *testing.B) {
	in := Input{PowerW: 50, GainDBi: 2.15, FreqMHz: 146.52, Mode: ModeFM, OnTime: 5 * time.Minute, OffTime: 5 * time.Minute, AntennaHeightM: 3}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Evaluate(in); err != nil {
			b.Fatal(err)
		}
	}
}

// The forward formulas below are kept in the tests as independent checks
// of the solved forms the package exports.

// farFieldPowerDensityWM2 returns the far-field power density in W/m² at
// distance distanceM (m, > 0) from an antenna radiating eirpW (W, EIRP in
// the direction of interest), with ground-reflection factor reflection
// (1, 2.56 or 4): S = F·EIRP/(4πR²), FCC OET Bulletin 65 (ed. 97-01)
// eqs. (3)–(6). Within about λ/2π of the antenna (NearFieldBoundaryM) the
// formula overestimates and is not reliable.
func farFieldPowerDensityWM2(eirpW, distanceM, reflection float64) float64 {
	return reflection * eirpW / (4 * math.Pi * distanceM * distanceM)
}

// exemptAt reports whether a source of erpW watts (the greater of its
// time-averaged ERP and available power) at freqMHz is exempt from routine
// evaluation under 47 CFR § 1.1307(b)(3)(i)(C) for people no closer than
// distanceM metres. Errors are those of ExemptionThresholdERPW, or a
// negative power.
func exemptAt(freqMHz, erpW, distanceM float64) (bool, error) {
	if math.IsNaN(erpW) || erpW < 0 {
		return false, fmt.Errorf("%w: ERP %g W is negative; give 0 W or more", ErrInput, erpW)
	}
	threshold, err := ExemptionThresholdERPW(freqMHz, distanceM)
	if err != nil {
		return false, err
	}
	return erpW <= threshold, nil
}

// TestEvaluateCleanValues sweeps powers, gains, heights, modes and
// standards and checks that no figure of a report is negative, NaN or a
// rounding residue (0 < |v| < 1e-9), which would print as "-0" or "2.2e-16".
func TestEvaluateCleanValues(t *testing.T) {
	n := 0
	for _, std := range exposureStandards {
		for _, p := range []float64{0.001, 0.1, 1, 5, 50, 1500} {
			for _, h := range []float64{0, 1, 2, 2.0000000001, 3, 3.5, 10, 60} {
				for _, f := range []float64{0.3, 3.5, 29.7, 30, 146, 400, 446, 1296, 10000, 100000} {
					rep, err := Evaluate(Input{PowerW: p, GainDBi: 2.15, FreqMHz: f, Mode: ModeSSB, TxFraction: 0.5, AntennaHeightM: h, Standard: std})
					if err != nil {
						t.Fatal(err)
					}
					n++
					for name, v := range map[string]float64{"distance public": rep.DistancePublicM, "distance occ": rep.DistanceOccupationalM,
						"keepout public": rep.KeepoutPublicM, "keepout occ": rep.KeepoutOccupationalM, "exempt": rep.ExemptBeyondM, "erp": rep.ERPW} {
						if math.IsNaN(v) || v < 0 || (v != 0 && math.Abs(v) < 1e-9) || math.Signbit(v) {
							t.Errorf("%s %g W %g m %g MHz: %s = %g", std, p, h, f, name, v)
						}
					}
					// Keep-out radius never exceeds the compliance distance
					// and equals it at or below head height (geometry).
					if rep.KeepoutPublicM > rep.DistancePublicM || (h <= 2 && rep.KeepoutPublicM != rep.DistancePublicM) {
						t.Errorf("%s %g W %g m: keep-out %g m vs distance %g m", std, p, h, rep.KeepoutPublicM, rep.DistancePublicM)
					}
				}
			}
		}
	}
	if n == 0 {
		t.Fatal("no case ran")
	}
}

// TestSources checks that every figure says where it comes from: the US
// table is cited and checked, the ICNIRP sets are marked from memory until
// checked in full against their published tables (ICNIRP 2020 Table 5 has
// not been read; ICNIRP 1998 Table 6 only in part), and ssb-processed's 50 %
// is marked typical: Supplement B Table 2 itself was not read, and secondary
// copies of it disagree (40 % on hintlink.com "power_density", VP9KF; 0.5
// in a 1997 station-evaluation worksheet on the TowerTalk list, K6LL).
func TestSources(t *testing.T) {
	for _, tc := range []struct {
		std     Standard
		want    string
		fromMem bool
	}{
		{StandardFCC, "§ 1.1310(e)(1) Table 1", false},
		{StandardICNIRP2020, "Table 5", true},
		{StandardICNIRP1998, "Tables 6 and 7", true},
	} {
		rep, err := Evaluate(Input{PowerW: 5, FreqMHz: 146, Standard: tc.std, Mode: ModeSSBProcessed})
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(rep.LimitsSource, tc.want) || rep.LimitsFromMemory != tc.fromMem {
			t.Errorf("%s: source %q from memory %v; want %q, %v", tc.std, rep.LimitsSource, rep.LimitsFromMemory, tc.want, tc.fromMem)
		}
		if rep.LimitsFromMemory != (rep.LimitsFromMemoryPublic || rep.LimitsFromMemoryOccupational) || (rep.LimitsNote != "") != rep.LimitsFromMemory {
			t.Errorf("%s: from memory %v, public %v, occupational %v, note %q", tc.std, rep.LimitsFromMemory, rep.LimitsFromMemoryPublic, rep.LimitsFromMemoryOccupational, rep.LimitsNote)
		}
		if rep.DutyFactor != 0.5 || !strings.Contains(rep.DutySource, "typical") {
			t.Errorf("ssb-processed: duty %g from %q; want 0.5, typical", rep.DutyFactor, rep.DutySource)
		}
	}
	if s := ModeSSB.DutySource(); !strings.Contains(s, "Supplement B") {
		t.Errorf("ssb duty source %q", s)
	}
	rep, _ := Evaluate(Input{PowerW: 5, FreqMHz: 146, DutyFactor: 0.3})
	if rep.DutySource != "given" {
		t.Errorf("override duty source %q, want given", rep.DutySource)
	}
	if len(MastCautions()) == 0 || len(Cautions()) <= len(MastCautions()) {
		t.Error("cautions missing")
	}
}

// TestTierSource checks the table and from-memory mark of each tier: the
// US Table 1 and ICNIRP 1998 Table 7 (public) are checked (Table 7 against
// the public reference levels of Council Recommendation 1999/519/EC,
// Annex III, taken from it); ICNIRP 2020 Table 5 (both tiers) and ICNIRP
// 1998 Table 6 (occupational) are from memory, and the report and its
// note say so for exactly those tiers.
func TestTierSource(t *testing.T) {
	pub, occ := TierPublic, TierOccupational
	for _, tc := range []struct {
		std     Standard
		tier    Tier
		want    string
		fromMem bool
	}{
		{StandardFCC, pub, "Table 1 (B)", false},
		{StandardFCC, occ, "Table 1 (A)", false},
		{StandardICNIRP2020, pub, "Table 5, general public", true},
		{StandardICNIRP2020, occ, "Table 5, occupational", true},
		{StandardICNIRP1998, pub, "Table 7, general public", false},
		{StandardICNIRP1998, occ, "Table 6, occupational", true},
		{"nosuch", pub, "", false},
		{StandardFCC, Tier(7), "", false},
	} {
		src, mem := TierSource(tc.std, tc.tier)
		if (tc.want == "" && src != "") || !strings.Contains(src, tc.want) || mem != tc.fromMem {
			t.Errorf("TierSource(%s, %v) = %q, %v; want %q, %v", tc.std, tc.tier, src, mem, tc.want, tc.fromMem)
		}
		if tc.want == "" || tc.std == "nosuch" {
			continue
		}
		rep, err := Evaluate(Input{PowerW: 5, FreqMHz: 446, Standard: tc.std})
		if err != nil {
			t.Fatal(err)
		}
		got := rep.LimitsFromMemoryPublic
		if tc.tier == occ {
			got = rep.LimitsFromMemoryOccupational
		}
		if got != tc.fromMem {
			t.Errorf("%s %v: report from memory %v, want %v", tc.std, tc.tier, got, tc.fromMem)
		}
	}
	for _, tc := range []struct {
		std       Standard
		want, not []string
	}{
		{StandardFCC, nil, nil},
		{StandardICNIRP2020, []string{"Both tiers", "Table 5", "from memory"}, nil},
		{StandardICNIRP1998, []string{"Table 6 (occupational), are from memory", "Table 7, are checked", "1999/519/EC"}, []string{"Table 7, are from memory"}},
	} {
		note := LimitsNote(tc.std)
		if (len(tc.want) == 0) != (note == "") {
			t.Errorf("LimitsNote(%s) = %q", tc.std, note)
		}
		for _, w := range tc.want {
			if !strings.Contains(note, w) {
				t.Errorf("LimitsNote(%s) = %q, lacks %q", tc.std, note, w)
			}
		}
		for _, w := range tc.not {
			if strings.Contains(note, w) {
				t.Errorf("LimitsNote(%s) = %q, has %q", tc.std, note, w)
			}
		}
	}
}
