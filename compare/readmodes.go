package compare

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"reflect"
	"strings"
)

// ReadModesFile reads a result or modes file strictly: unknown keys are errors,
// so a misspelt key is not silently ignored.
func ReadModesFile(path string) (*Result, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read the modes file: %w", err)
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var res Result
	if err := dec.Decode(&res); err != nil {
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case errors.As(err, &se):
			line, col := lineCol(data, se.Offset)
			return nil, fmt.Errorf("%s:%d:%d: %s; check the JSON syntax", path, line, col, strings.TrimPrefix(se.Error(), "json: "))
		case errors.As(err, &te) && te.Field == "":
			return nil, fmt.Errorf("%s: the file holds a JSON %s; compare reads an object: an analyze result, or your "+
				"modes inside {\"modes\": [...]}", path, te.Value)
		case errors.As(err, &te):
			line, col := lineCol(data, te.Offset)
			return nil, fmt.Errorf("%s:%d:%d: key %q: a JSON %s where %s is expected", path, line, col, te.Field, te.Value, jsonKindWords(te.Type.Kind()))
		case strings.HasPrefix(err.Error(), "json: unknown field "):
			return nil, fmt.Errorf("%s: unknown key %s; check its spelling against the keys of a result (see the README)",
				path, strings.TrimPrefix(err.Error(), "json: unknown field "))
		case errors.Is(err, io.EOF):
			return nil, fmt.Errorf("%s: the file is empty; it should hold an analyze result or an object with a \"modes\" array", path)
		}
		return nil, fmt.Errorf("%s: %s (the file holds a ridemodes result or an object with a \"modes\" array)", path, strings.TrimPrefix(err.Error(), "json: "))
	}
	if len(res.Modes) == 0 {
		return nil, fmt.Errorf("%s: no \"modes\" array with measured modes", path)
	}
	return &res, nil
}

// jsonKindWords words what a key of the result holds, for a reader.
func jsonKindWords(k reflect.Kind) string {
	switch k {
	case reflect.Float64, reflect.Int:
		return "a number"
	case reflect.String:
		return "a quoted text"
	case reflect.Bool:
		return "true or false"
	case reflect.Slice:
		return "an array [...]"
	}
	return "an object {...}"
}

// lineCol converts a byte offset into a 1-based line and column.
func lineCol(data []byte, off int64) (int, int) {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	before := data[:off]
	line := bytes.Count(before, []byte("\n")) + 1
	col := int(off) - bytes.LastIndexByte(before, '\n')
	return line, col
}
