package disciplines

// The reference page of the model's variables, VARIABLES.md, is written
// from the model; variables_page_test.go checks that it is fresh.
//go:generate go run ./internal/varsdoc/gen VARIABLES.md
