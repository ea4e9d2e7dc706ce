package ingest

import (
	"bufio"
	"bytes"
	"fmt"
	"regexp"
	"strings"
)

// keyLocator finds the line of a key in a TOML file and the key on a line.
// The TOML decoder reports lines for the keys it rejects but not for values
// that fail validation, so this reads table headers and key names from the
// text: enough for the flat tables of a setup file (multi-line strings and
// inline tables are not followed into).
type keyLocator struct {
	lines map[string]int // "vehicle.mass_kg", "sensor[2].channel", "sensor[2]" -> line
	paths map[int]string // the reverse
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
	loc := &keyLocator{lines: map[string]int{}, paths: map[int]string{}}
	count := map[string]int{}
	table := ""
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 64*1024), 1<<20)
	for n := 1; sc.Scan(); n++ {
		t := strings.TrimSpace(sc.Text())
		path := ""
		switch {
		case t == "" || t[0] == '#':
			continue
		case arrayHeader.MatchString(t):
			name := cleanKey(arrayHeader.FindStringSubmatch(t)[1])
			count[name]++
			table = fmt.Sprintf("%s[%d]", name, count[name])
			path = table
		case tableHeader.MatchString(t):
			table = cleanKey(tableHeader.FindStringSubmatch(t)[1])
			path = table
		case keyLine.MatchString(t):
			path = cleanKey(keyLine.FindStringSubmatch(t)[1])
			if table != "" {
				path = table + "." + path
			}
		default:
			continue
		}
		if _, ok := loc.lines[path]; !ok {
			loc.lines[path] = n
		}
		loc.paths[n] = path
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

// at returns the path of the key or table header on a line ("" for none).
func (l *keyLocator) at(line int) string { return l.paths[line] }
