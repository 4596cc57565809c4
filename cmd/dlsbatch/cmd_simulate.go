package main

import (
	"context"
	"fmt"
)

// runSimulate is a placeholder until the subcommand is built.
func runSimulate(ctx context.Context, e env, args []string) int {
	fmt.Fprintln(e.stderr, "dlsbatch simulate: not built yet")
	return exitFatal
}
