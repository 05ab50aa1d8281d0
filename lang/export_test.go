package lang

// Internals that the external tests (package lang_test) look at.

// SourcesCount is the number of systems whose equation block the session
// remembers.
func SourcesCount(s *Session) int {
	s.mu.RLock()
	defer s.mu.RUnlock()
	return len(s.sources)
}

// FieldNames lists what completion offers after "v.".
func FieldNames(s *Session, v any) []string { return s.reg.fieldNames(v) }

// WordsOfType is the fallback name of a type no registry describes.
var WordsOfType = wordsOfType
