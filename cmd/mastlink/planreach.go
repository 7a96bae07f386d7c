package main

import (
	"context"
	"io"

	"github.com/mastlink/mastlink/plan"
)

// addPlanRoutesAndSites evaluates the plan's `routes:` and `sites:` into
// res, with a progress bar each.
func addPlanRoutesAndSites(ctx context.Context, g *globals, p *plan.Plan, env *plan.Env, res *plan.PlanResult) error {
	if len(p.Routes) > 0 {
		bar := newProgress(g, "route paths")
		routes, err := plan.EvaluatePlanRoutes(ctx, p, env, bar.update)
		bar.done()
		if err != nil {
			return err
		}
		res.Routes = routes
	}
	if len(p.Sites) > 0 {
		bar := newProgress(g, "site paths")
		sites, err := plan.EvaluatePlanSites(ctx, p, env, bar.update)
		bar.done()
		if err != nil {
			return err
		}
		res.Sites = sites
	}
	return nil
}

// renderPlanRoutesAndSites writes the briefing's route and site sections.
func renderPlanRoutesAndSites(w io.Writer, res *plan.PlanResult, im bool) {
	for i := range res.Routes {
		renderRouteText(w, &res.Routes[i], im)
	}
	if res.Sites != nil {
		renderSitesText(w, res.Sites, im)
	}
}
