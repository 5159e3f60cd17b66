package api

import "strings"

// joinFieldPath is the one joiner of JSON paths: the path rest (a member
// name, a dotted path, or an index step "[2]...") under prefix; either may
// be empty.
func joinFieldPath(prefix, rest string) string {
	switch {
	case rest == "":
		return prefix
	case prefix == "":
		return rest
	case strings.HasPrefix(rest, "["):
		return prefix + rest
	}
	return prefix + "." + rest
}
