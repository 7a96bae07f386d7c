package antenna

import (
	"errors"
	"strings"
	"testing"
)

func TestParseCarryAndBodyLoss(t *testing.T) {
	tests := []struct {
		in     string
		want   Carry
		lossDB float64 // typical, from memory (see BodyLossFaceDB)
		ok     bool
	}{
		{"face", AtFace, 3, true},
		{" Head ", AtFace, 3, true},
		{"belt", OnBelt, 12, true},
		{"HIP", OnBelt, 12, true},
		{"none", NotCarried, 0, true},
		{"pocket", 0, 0, false},
		{"", 0, 0, false},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			c, err := ParseCarry(tt.in)
			if !tt.ok {
				if !errors.Is(err, ErrUnknownCarry) || !strings.Contains(err.Error(), "face, belt, none") {
					t.Fatalf("err %v: want ErrUnknownCarry listing the known names", err)
				}
				return
			}
			if err != nil || c != tt.want {
				t.Fatalf("got %v, %v; want %v", c, err, tt.want)
			}
			if got := c.BodyLossDB(); got != tt.lossDB {
				t.Errorf("body loss %g dB, want %g dB", got, tt.lossDB)
			}
			if back, err := ParseCarry(c.String()); err != nil || back != c {
				t.Errorf("String %q does not parse back: %v, %v", c.String(), back, err)
			}
		})
	}
}

// Body loss is a loss: positive, and more on the belt than at the face
// (common practice: the body shadows and detunes the antenna more at the hip).
func TestBodyLossOrder(t *testing.T) {
	if !(0 < BodyLossFaceDB && BodyLossFaceDB < BodyLossBeltDB) {
		t.Fatalf("face %g dB, belt %g dB: want 0 < face < belt", BodyLossFaceDB, BodyLossBeltDB)
	}
}

func FuzzParseCarry(f *testing.F) {
	for _, s := range []string{"face", "belt", "none", "hip", "head", "", "FACE ", "b\x00elt"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		c, err := ParseCarry(s)
		if err != nil {
			if !errors.Is(err, ErrUnknownCarry) {
				t.Fatalf("error %v does not wrap ErrUnknownCarry", err)
			}
			return
		}
		if l := c.BodyLossDB(); l < 0 {
			t.Fatalf("negative body loss %g dB", l)
		}
	})
}
