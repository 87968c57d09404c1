// Package layout holds no code: its test checks the project's import rules (DEVELOPERS.md,
// "Architecture in a page") with `go list`, so that a change that breaks them fails CI.
package layout
