package ingest

import (
	"bufio"
	"bytes"
	"fmt"
	"regexp"
	"strings"
)

// keyLocator finds the line of a key in a TOML file. The TOML decoder reports
// lines for syntax and type errors but not for keys it did not decode, nor for
// values that fail validation, so this reads table headers and key names from
// the text: enough for the flat tables of a setup file (multi-line strings and
// inline tables are not followed into).
type keyLocator struct {
	lines map[string]int // "vehicle.mass_kg", "sensor[2].channel", "sensor[2]" -> line
	plain []located      // in file order, paths without array indices
}

type located struct {
	path string // without array indices
	full string // with them
	line int
}

var (
	arrayHeader = regexp.MustCompile(`^\[\[\s*([^\]]+?)\s*\]\]`)
	tableHeader = regexp.MustCompile(`^\[\s*([^\]]+?)\s*\]`)
	keyLine     = regexp.MustCompile(`^("[^"]*"|'[^']*'|[A-Za-z0-9_\-\.\s"']+?)\s*=`)
)

func cleanKey(k string) string {
	parts := strings.Split(k, ".")
	for i, p := range parts {
		parts[i] = strings.Trim(strings.TrimSpace(p), `"'`)
	}
	return strings.Join(parts, ".")
}

func newKeyLocator(data []byte) *keyLocator {
	loc := &keyLocator{lines: map[string]int{}}
	count := map[string]int{}
	table, plainTable := "", ""
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 64*1024), 1<<20)
	for n := 1; sc.Scan(); n++ {
		t := strings.TrimSpace(sc.Text())
		switch {
		case t == "" || t[0] == '#':
			continue
		case arrayHeader.MatchString(t):
			name := cleanKey(arrayHeader.FindStringSubmatch(t)[1])
			count[name]++
			table, plainTable = fmt.Sprintf("%s[%d]", name, count[name]), name
		case tableHeader.MatchString(t):
			table = cleanKey(tableHeader.FindStringSubmatch(t)[1])
			plainTable = table
		case keyLine.MatchString(t):
			key := cleanKey(keyLine.FindStringSubmatch(t)[1])
			full, plain := key, key
			if table != "" {
				full, plain = table+"."+key, plainTable+"."+key
			}
			if _, ok := loc.lines[full]; !ok {
				loc.lines[full] = n
			}
			loc.plain = append(loc.plain, located{plain, full, n})
			continue
		default:
			continue
		}
		if _, ok := loc.lines[table]; !ok {
			loc.lines[table] = n
		}
		loc.plain = append(loc.plain, located{plainTable, table, n})
	}
	return loc
}

// line returns the line of a key or table path such as "sensor[2].x_m"
// (0 when not found or path is empty).
func (l *keyLocator) line(path string) int {
	if path == "" {
		return 0
	}
	return l.lines[path]
}

// first returns the first line whose path without array indices is path,
// and that line's full path with indices (path itself when not found).
func (l *keyLocator) first(path string) (int, string) {
	for _, p := range l.plain {
		if p.path == path {
			return p.line, p.full
		}
	}
	return 0, path
}
