// Command mastlink plans portable VHF/UHF radio deployments: link budgets
// over terrain, mast and coax trade-offs, route coverage, site ranking and
// RF-exposure keep-out distances.
package main

import (
	"context"
	"os"
)

func main() {
	os.Exit(run(context.Background(), os.Args[1:], os.Stdin, os.Stdout, os.Stderr))
}
