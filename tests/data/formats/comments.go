// Package store keeps records on disk.
package store

// Open returns a handle to the named store.
func Open(name string) {
	s := `raw string // not a comment`
	r := '\'' // a quote rune
	_ = s /* inline note */
}
