package batch_test

import (
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/batch"
)

// TestManifestMistakes: every mistake is a *ManifestError at the line and
// column (1-based, as an editor counts) of the offending cell.
func TestManifestMistakes(t *testing.T) {
	for _, c := range []struct {
		name, text   string
		line, column int
		want         string
	}{
		{"empty", "", 0, 0, "header log,setup,car,run"},
		{"only comments", "# a campaign\n", 0, 0, "header log,setup,car,run"},
		{"header only", "log,setup,car,run\n", 1, 1, "names no log"},
		{"missing column", "log,setup,car\na.csv,car.toml,HX2\n", 1, 1, "no run column"},
		{"column twice", "log,setup,car,run,date,date\n", 1, 24, `"date" appears twice`},
		{"unnamed column", "log,setup,,car,run\n", 1, 11, "no name"},
		{"summary column as metadata", "log,setup,car,run,verdict\n", 1, 19, `"verdict" is a summary column`},
		{"too many cells", "log,setup,car,run\na.csv,car.toml,HX2,1,extra\n", 2, 1, "5 cells, but the header has 4"},
		{"too few cells", "log,setup,car,run\n\na.csv,car.toml,HX2\n", 3, 1, "3 cells"},
		{"empty car", "log,setup,car,run\na.csv,car.toml, ,1\n", 2, 16, "car cell is empty"},
		{"empty log", "log,setup,car,run\n\"\",car.toml,HX2,1\n", 2, 1, "log cell is empty"},
		{"bad test", "log,setup,car,run,test\na.csv,car.toml,HX2,1,shaker\n", 2, 22, `test "shaker"`},
		{"stray quote", "log,setup,car,run\na.csv,car\"s.toml,HX2,1\n", 2, 10, "quote a whole cell"},
		{"unclosed quote", "log,setup,car,run\n\"a.csv,car.toml,HX2,1\n", 2, 23, "quote a whole cell"},
		{"same row twice", "log,setup,car,run\na.csv,car.toml,HX2,1\n# again\n./a.csv,car.toml,HX2,2\n", 4, 1, "already on line 2"},
		{"byte order mark", "\ufefflog,setup,car,run,run\n", 1, 19, `"run" appears twice`},
	} {
		_, err := batch.ParseManifest(strings.NewReader(c.text), "campaign.csv")
		var me *batch.ManifestError
		if !errors.As(err, &me) || me.Line != c.line || me.Column != c.column || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want campaign.csv:%d:%d naming %q", c.name, err, c.line, c.column, c.want)
			continue
		}
		if c.line > 0 && !strings.HasPrefix(err.Error(), "campaign.csv:") {
			t.Errorf("%s: %q does not start with the file", c.name, err)
		}
	}
}

// TestManifestRows: columns in any order, the optional test column,
// metadata kept in order, comments, spaces and blank lines; paths as
// written by ParseManifest and joined to the manifest's folder by
// ReadManifest, which loads each setup once.
func TestManifestRows(t *testing.T) {
	text := "# spring campaign\nrun, log ,car,setup,date,test,notes\n" +
		"r1,day1/rig.csv,HX2,car.toml,2026-03-02,,baseline\n\n" +
		"r2,day1/drop.csv,HX2,car.toml,2026-03-02,drop,\"after the spring change, 40 N/mm\"\n"
	c, err := batch.ParseManifest(strings.NewReader(text), "campaign.csv")
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(c.MetaColumns, []string{"date", "notes"}) || len(c.Items) != 2 {
		t.Fatalf("meta %v, %d items", c.MetaColumns, len(c.Items))
	}
	it := c.Items[1]
	if it.Log != "day1/drop.csv" || it.Setup != "car.toml" || it.Car != "HX2" || it.Run != "r2" || it.Test != "drop" || it.Line != 5 ||
		!slices.Equal(it.Meta, []string{"2026-03-02", "after the spring change, 40 N/mm"}) {
		t.Errorf("second row: %+v", it)
	}
	if c.Items[0].Test != "" {
		t.Errorf("empty test cell: %q", c.Items[0].Test)
	}

	dir := t.TempDir()
	if err := os.Mkdir(filepath.Join(dir, "cars"), 0o755); err != nil {
		t.Fatal(err)
	}
	targetsSetup(t, filepath.Join(dir, "cars"))
	path := filepath.Join(dir, "campaign.csv")
	writeFile(t, path, strings.ReplaceAll(text, "car.toml", "cars/car.toml"))
	c, err = batch.ReadManifest(path, "")
	if err != nil {
		t.Fatal(err)
	}
	if c.Items[0].Log != filepath.Join(dir, "day1", "rig.csv") || c.Items[1].Setup != filepath.Join(dir, "cars", "car.toml") || c.Manifest != path {
		t.Errorf("paths not joined to the manifest's folder: %+v", c.Items[0])
	}
	// The command's test fills empty test cells only.
	if c, err = batch.ReadManifest(path, "rig"); err != nil || c.Items[0].Test != "rig" || c.Items[1].Test != "drop" {
		t.Errorf("with test rig: %v, items %+v", err, c)
	}
	var oe *compare.OptionError
	if _, err := batch.ReadManifest(path, "shaker"); !errors.As(err, &oe) {
		t.Errorf("test shaker: %v, want an option error", err)
	}
}

// TestManifestSetupMistake: a setup that cannot be loaded stops the
// campaign at the manifest cell that names it.
func TestManifestSetupMistake(t *testing.T) {
	dir := t.TempDir()
	targetsSetup(t, dir)
	writeFile(t, filepath.Join(dir, "broken.toml"), "[vehicle]\nmass_kg = \"heavy\"\n")
	path := filepath.Join(dir, "campaign.csv")
	writeFile(t, path, "log,setup,car,run\na.csv,car.toml,HX2,1\nb.csv,broken.toml,HX2,2\n")
	_, err := batch.ReadManifest(path, "")
	var me *batch.ManifestError
	if !errors.As(err, &me) || me.Line != 3 || me.Column != 7 || !strings.Contains(err.Error(), "broken.toml:2") {
		t.Errorf("got %v, want campaign.csv:3:7 with the setup's own line", err)
	}
}

// FuzzParseManifest: any text gives a campaign or a *ManifestError, never a
// panic; a campaign's items are complete and carry every metadata column.
func FuzzParseManifest(f *testing.F) {
	for _, s := range []string{
		"log,setup,car,run\na.csv,car.toml,HX2,1\n",
		"log,setup,car,run,test,date\na.csv,car.toml,HX2,1,drop,2026-03-02\n# c\n\"b,c.csv\",car.toml,HX2,2,,\n",
		"\ufefflog,setup,car,run\na,\"b\"\"\",c,d\r\n",
		"log,setup,car,run\na.csv,car.toml,HX2\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, text string) {
		c, err := batch.ParseManifest(strings.NewReader(text), "fuzz.csv")
		if err != nil {
			var me *batch.ManifestError
			if !errors.As(err, &me) || me.Line < 0 || (me.Line > 0 && me.Column < 1) {
				t.Fatalf("error %v (%T) is not a placed ManifestError", err, err)
			}
			return
		}
		if len(c.Items) == 0 {
			t.Fatal("a campaign without items")
		}
		for _, it := range c.Items {
			if it.Log == "" || it.Setup == "" || it.Car == "" || it.Run == "" || len(it.Meta) != len(c.MetaColumns) ||
				(it.Test != "" && it.Test != "rig" && it.Test != "drop") {
				t.Fatalf("incomplete item %+v", it)
			}
		}
	})
}
