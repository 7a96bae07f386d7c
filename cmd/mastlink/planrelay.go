package main

import (
	"context"
	"fmt"
	"io"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/paulmach/orb"
)

// planRelay is one relays: entry of a plan run: the answer as `relay`
// gives it, and its request (for the text).
type planRelay struct {
	out relayOutput
	req plan.RelayRequest
}

// planRelays runs the plan's relays: entries in order, each as `mastlink
// relay --plan FILE` runs the plan's first (the plan's defaults as the
// relay's kit, its roads, DefaultRelaySpots spots, the default separation).
func planRelays(ctx context.Context, g *globals, p *plan.Plan, env *plan.Env) ([]planRelay, error) {
	var roads []orb.LineString
	if len(p.Relays) > 0 && len(p.Roads) > 0 {
		var err error
		if roads, err = plan.ReadRoads(p.Roads); err != nil {
			return nil, fmt.Errorf("%s: roads: %w", p.Path, err)
		}
	}
	var out []planRelay
	for i, spec := range p.Relays {
		where := fmt.Sprintf("%s:%d: relays[%d]", p.Path, spec.Line, i)
		req, err := relayRequest(p, spec, [2]string{where + ".between", where + ".and"})
		if err != nil {
			return nil, err
		}
		req.Spots = plan.DefaultRelaySpots
		req.FreqAMHz, req.FreqBMHz = firstPositive(spec.FreqAMHz, p.FreqMHz), firstPositive(spec.FreqBMHz, p.FreqMHz)
		if req.FreqAMHz <= 0 || req.FreqBMHz <= 0 {
			return nil, usagef("%s: give frequency_a and frequency_b, or the plan's frequency:", where)
		}
		req.Roads = roads
		bar := newProgress(g, fmt.Sprintf("relay %d radials", i+1))
		res, err := env.FindRelay(ctx, req, bar.update)
		bar.done()
		if err != nil {
			return nil, fmt.Errorf("%s: %w", where, err)
		}
		out = append(out, planRelay{out: newRelayOutput(res, req, env), req: req})
	}
	return out, nil
}

// planJSON is the plan command's JSON: the plan's result and its relays.
type planJSON struct {
	*plan.PlanResult
	Relays []relayOutput `json:"relays,omitempty"`
}

func newPlanJSON(res *plan.PlanResult, relays []planRelay) planJSON {
	out := planJSON{PlanResult: res}
	for _, r := range relays {
		out.Relays = append(out.Relays, r.out)
	}
	return out
}

// renderPlanRelays writes the plan text's relay section: each relay as the
// relay command shows it.
func renderPlanRelays(w io.Writer, relays []planRelay, im bool) {
	for _, r := range relays {
		renderRelayText(w, r.out, r.req, im)
		fmt.Fprintln(w)
	}
}

// relayWaypoints are the spots of the plan's relays as GPX waypoints for
// plan.gpx: "Relay N" for the plan's only relay, "Relay K.N" (relays:
// entry K) when it has several.
func relayWaypoints(relays []planRelay) []gpx.Place {
	var out []gpx.Place
	for k, pr := range relays {
		r := pr.out.RelayResult
		for _, s := range r.Spots {
			name := fmt.Sprintf("Relay %d", s.Rank)
			if len(relays) > 1 {
				name = fmt.Sprintf("Relay %d.%d", k+1, s.Rank)
			}
			out = append(out, gpx.Place{Name: name, Pos: orb.Point{s.Lon, s.Lat}, ElevM: s.ElevationM, Symbol: "Flag",
				Description: relaySpotText(r, s)})
		}
	}
	return out
}

// relaySpotText describes a relay spot for a GPX waypoint.
func relaySpotText(r *plan.RelayResult, s plan.RelaySpot) string {
	return fmt.Sprintf("relay between %s and %s, antenna %.1f m above ground: margin %+.1f dB to %s, %+.1f dB to %s (worst %+.1f dB; %.1f dB needed)",
		r.A, r.B, s.HeightM, s.MarginToADB, r.A, s.MarginToBDB, r.B, s.WorstMarginDB, r.NeededMarginDB)
}
