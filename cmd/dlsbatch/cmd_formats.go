package main

import (
	"context"
	"io"
)

// runFormats prints the tables of help/formats.txt, which README.md repeats.
func runFormats(ctx context.Context, e env, args []string) int {
	return listCommand(e, "formats", help("formats.usage"), args, func(w io.Writer) error {
		_, err := io.WriteString(w, help("formats"))
		return err
	})
}
