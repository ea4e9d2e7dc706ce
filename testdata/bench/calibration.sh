#!/usr/bin/env bash
# Calibration sweep: simulate seeded rig and drop logs of five invented cars
# under 14 test conditions, analyse each with the library (job.Analyze) and
# judge every reported figure against the truth and its stated uncertainty.
# Prints Markdown tables and PASS/FAIL lines for the acceptance figures; the
# program is testdata/calibration (outside `go test ./...`). Usage, from the
# repository root:
#   bash testdata/bench/calibration.sh [-seeds 12] [-cars 'hatch,suv'] [-conds 'rig-5min-*'] [-csv cases.csv]
# (-list shows the cars and conditions; -h every option.)
set -euo pipefail
echo "commit: $(git describe --always --dirty 2>/dev/null || echo unknown)"
exec go run ./testdata/calibration "$@"
