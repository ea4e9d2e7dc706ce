package compare

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"os"
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
			return nil, fmt.Errorf("%s:%d:%d: %v; check the JSON syntax", path, line, col, se)
		case errors.As(err, &te):
			line, col := lineCol(data, te.Offset)
			return nil, fmt.Errorf("%s:%d:%d: key %q: %v", path, line, col, te.Field, err)
		}
		return nil, fmt.Errorf("%s: %v (the file holds a ridemodes result or an object with a \"modes\" array)", path, err)
	}
	if len(res.Modes) == 0 {
		return nil, fmt.Errorf("%s: no \"modes\" array with measured modes", path)
	}
	return &res, nil
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
