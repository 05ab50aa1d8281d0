package kernel

import "unicode/utf8"

// globMatch reports whether s matches pattern as a history search pattern
// does in Jupyter (IPython keeps history in SQLite and searches it with
// GLOB): "*" matches any run of characters, "/" and newlines included; "?"
// matches one character; "[abc]", "[a-z]" and "[^abc]" match one character
// in or not in a set, where a "]" right after "[" or "[^" is a member; there
// is no escape character. Matching is case-sensitive. path.Match differs in
// treating "/" as a separator, so "*" never matched across it.
func globMatch(pattern, s string) bool {
	// Iterative matching with backtracking to the last "*": linear in
	// practice, never exponential.
	px, sx := 0, 0
	starP, starS := -1, -1
	for sx < len(s) {
		if px < len(pattern) {
			switch pattern[px] {
			case '*':
				starP, starS = px, sx
				px++
				continue
			case '?':
				_, n := utf8.DecodeRuneInString(s[sx:])
				px++
				sx += n
				continue
			case '[':
				r, n := utf8.DecodeRuneInString(s[sx:])
				if ok, end := matchClass(pattern, px, r); end > 0 {
					if ok {
						px = end
						sx += n
						continue
					}
				} else if s[sx] == '[' { // an unclosed "[" is itself
					px++
					sx++
					continue
				}
			default:
				pr, pn := utf8.DecodeRuneInString(pattern[px:])
				r, n := utf8.DecodeRuneInString(s[sx:])
				if pr == r {
					px += pn
					sx += n
					continue
				}
			}
		}
		if starP < 0 {
			return false
		}
		// Let the last "*" take one more character and try again.
		_, n := utf8.DecodeRuneInString(s[starS:])
		starS += n
		px, sx = starP+1, starS
	}
	for px < len(pattern) && pattern[px] == '*' {
		px++
	}
	return px == len(pattern)
}

// matchClass matches r against the class that starts at pattern[start]
// ("["). It returns whether r is matched and the index just past the class,
// or end 0 if the class is not closed.
func matchClass(pattern string, start int, r rune) (ok bool, end int) {
	i := start + 1
	negate := false
	if i < len(pattern) && pattern[i] == '^' {
		negate = true
		i++
	}
	first := true
	for i < len(pattern) {
		c, n := utf8.DecodeRuneInString(pattern[i:])
		if c == ']' && !first {
			return ok != negate, i + 1
		}
		first = false
		i += n
		lo, hi := c, c
		if i+1 < len(pattern) && pattern[i] == '-' && pattern[i+1] != ']' {
			hi, n = utf8.DecodeRuneInString(pattern[i+1:])
			i += 1 + n
		}
		if lo <= r && r <= hi {
			ok = true
		}
	}
	return false, 0
}
