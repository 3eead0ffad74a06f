package physics

// Tag is the confidence of an engineering value, as in REFERENCE.md.
type Tag string

// Confidence tags.
const (
	// Verified: confirmed in the cited source.
	Verified Tag = "V"
	// Derived: computed by shown arithmetic from verified inputs.
	Derived Tag = "D"
	// Memory: from memory, not confirmed against the source; a default the
	// user must be able to override.
	Memory Tag = "M"
	// User: a value set by the user (spec override); the user owns it.
	User Tag = "U"
)

// String returns the tag in brackets, "[V]", "[D]", "[M]" or "[U]".
func (t Tag) String() string {
	if t == "" {
		return "[?]"
	}
	return "[" + string(t) + "]"
}

// Unverified reports whether a value with this tag must be shown to users
// as an "unverified default" (REFERENCE.md §9).
func (t Tag) Unverified() bool { return t == Memory }
