package plumb

import (
	"fmt"
	"sort"
	"strings"
	"unicode"
)

// Text that misleads a reader is refused in system files: a report prints
// names, units and descriptions as they are, so what it shows must be what
// the file says.
//
//   - Bidirectional formatting characters (the explicit embeddings,
//     overrides and isolates and the implicit marks of Unicode's
//     bidirectional algorithm, UAX #9) are refused in every string of the
//     file: they reorder what a terminal shows, so that a formula can read
//     otherwise than it computes.
//   - A name (of the system, a variable or a parameter) is written in one
//     script, Unicode's Common and Inherited characters (digits, _) aside,
//     or in one of the combinations that UTS #39 ("Unicode Security
//     Mechanisms", Sect. 5.2, the Highly Restrictive level) allows: Latin
//     with Han and Hiragana and Katakana, with Han and Bopomofo, or with
//     Han and Hangul. Latin with Greek is allowed too, as mathematics
//     writes it (Δx, σ_y), unless one of the Greek letters looks like a
//     Latin one (ο beside x).
//   - Two names of one file that differ only by look-alike letters (x and
//     the Cyrillic х) are refused: a reader could not tell which is meant.
//
// The table of look-alikes is a small subset, for the Greek and Cyrillic
// letters that look like Latin ones, of the confusables that UTS #39
// publishes (written from memory; the full data file is not consulted).

// isBidiControl reports whether r is a bidirectional formatting character:
// ALM U+061C, LRM U+200E, RLM U+200F, LRE..RLO U+202A..U+202E, LRI..PDI
// U+2066..U+2069 (UAX #9, Table 4).
func isBidiControl(r rune) bool {
	switch {
	case r == 0x061C, r == 0x200E, r == 0x200F:
		return true
	case r >= 0x202A && r <= 0x202E:
		return true
	case r >= 0x2066 && r <= 0x2069:
		return true
	}
	return false
}

// lookAlike maps Greek and Cyrillic letters to the Latin letter they look
// like (a subset of UTS #39's confusables, from memory).
var lookAlike = map[rune]rune{
	// Cyrillic
	'а': 'a', 'е': 'e', 'о': 'o', 'р': 'p', 'с': 'c', 'у': 'y', 'х': 'x',
	'і': 'i', 'ј': 'j', 'ѕ': 's', 'һ': 'h', 'ԁ': 'd', 'ԛ': 'q', 'ԝ': 'w', 'ӏ': 'l',
	'А': 'A', 'В': 'B', 'Е': 'E', 'К': 'K', 'М': 'M', 'Н': 'H', 'О': 'O',
	'Р': 'P', 'С': 'C', 'Т': 'T', 'Х': 'X', 'У': 'Y', 'І': 'I', 'Ј': 'J', 'Ѕ': 'S',
	// Greek
	'Α': 'A', 'Β': 'B', 'Ε': 'E', 'Ζ': 'Z', 'Η': 'H', 'Ι': 'I', 'Κ': 'K',
	'Μ': 'M', 'Ν': 'N', 'Ο': 'O', 'Ρ': 'P', 'Τ': 'T', 'Υ': 'Y', 'Χ': 'X',
	'ο': 'o', 'ν': 'v', 'ρ': 'p', 'ι': 'i',
}

// scriptOf names the script of r ("" for Common and Inherited).
func scriptOf(r rune) string {
	if unicode.Is(unicode.Common, r) || unicode.Is(unicode.Inherited, r) {
		return ""
	}
	for _, s := range []string{"Latin", "Greek", "Cyrillic", "Han", "Hiragana", "Katakana", "Bopomofo", "Hangul"} {
		if unicode.Is(unicode.Scripts[s], r) {
			return s
		}
	}
	for name, t := range unicode.Scripts {
		if unicode.Is(t, r) {
			return name
		}
	}
	return "Unknown"
}

// allowedMixes are the combinations of scripts UTS #39's Highly
// Restrictive level allows in one identifier, plus Latin with Greek.
var allowedMixes = [][]string{
	{"Latin", "Han", "Hiragana", "Katakana"},
	{"Latin", "Han", "Bopomofo"},
	{"Latin", "Han", "Hangul"},
	{"Latin", "Greek"},
}

// mixedScript reports why name mixes scripts in a way that can mislead a
// reader, or "".
func mixedScript(name string) string {
	seen := map[string]bool{}
	for _, r := range name {
		if s := scriptOf(r); s != "" {
			seen[s] = true
		}
	}
	if len(seen) <= 1 {
		return ""
	}
	scripts := make([]string, 0, len(seen))
	for s := range seen {
		scripts = append(scripts, s)
	}
	sort.Strings(scripts)
	for _, mix := range allowedMixes {
		if !subset(scripts, mix) {
			continue
		}
		if seen["Latin"] && seen["Greek"] {
			for _, r := range name {
				if l, ok := lookAlike[r]; ok && scriptOf(r) == "Greek" {
					return fmt.Sprintf("%q mixes Latin letters with the Greek %q, which looks like the Latin %q: write the name in one script", name, string(r), string(l))
				}
			}
		}
		return ""
	}
	return fmt.Sprintf("%q mixes the scripts %s, which can look alike: write the name in one script", name, strings.Join(scripts, " and "))
}

func subset(a, of []string) bool {
	for _, x := range a {
		found := false
		for _, y := range of {
			found = found || x == y
		}
		if !found {
			return false
		}
	}
	return true
}

// skeleton maps every look-alike letter of name to its Latin twin, so that
// two names that a reader cannot tell apart have the same skeleton.
func skeleton(name string) string {
	return strings.Map(func(r rune) rune {
		if l, ok := lookAlike[r]; ok {
			return l
		}
		return r
	}, name)
}

// checkFileText refuses bidirectional formatting characters in every
// string of the file, mixed-script names, and names that look alike.
func checkFileText(f *fileSystem) error {
	type text struct{ field, s string }
	var all []text
	add := func(field, s string) { all = append(all, text{field, s}) }
	addPtr := func(field string, s *string) {
		if s != nil {
			add(field, *s)
		}
	}
	add("name", f.Name)
	add("description", f.Description)
	add("kind", f.Kind)
	add("time_unit", f.TimeUnit)
	addPtr("energy", f.Energy)
	for i, p := range f.Parameters {
		path := fmt.Sprintf("parameters[%d]", i)
		add(path+".name", p.Name)
		add(path+".unit", p.Unit)
		add(path+".description", p.Description)
	}
	for _, list := range []struct {
		key  string
		vars []fileVariable
	}{{"variables", f.Variables}, {"coordinates", f.Coordinates}, {"momenta", f.Momenta}} {
		for i, v := range list.vars {
			path := fmt.Sprintf("%s[%d]", list.key, i)
			add(path+".name", v.Name)
			add(path+".unit", v.Unit)
			add(path+".description", v.Description)
			addPtr(path+".rate", v.Rate)
			addPtr(path+".next", v.Next)
		}
	}
	for _, t := range all {
		for i, r := range []rune(t.s) {
			if isBidiControl(r) {
				return fileErr(t.field, "character %d is the bidirectional control U+%04X, which makes text show otherwise than it reads: remove it", i+1, r)
			}
		}
	}
	byLook := map[string]text{}
	for _, t := range all {
		if !strings.HasSuffix(t.field, "name") || t.s == "" {
			continue
		}
		if why := mixedScript(t.s); why != "" {
			return fileErr(t.field, "%s", why)
		}
		if t.field == "name" {
			continue // the system's own name shares no namespace with its variables
		}
		k := skeleton(t.s)
		if prev, ok := byLook[k]; ok && prev.s != t.s {
			return fileErr(t.field, "%q looks like %q at %s: use names a reader can tell apart", t.s, prev.s, prev.field)
		}
		byLook[k] = t
	}
	return nil
}
