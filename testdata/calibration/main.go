// Command calibration is ridemodes' seeded calibration sweep: it checks
// that every reported figure is as accurate as its stated uncertainty says,
// on logs with known truth.
//
// For each invented car (cars.go), each test condition (conditions.go: rig
// logs of 5 minutes and an hour, exact and coarse time stamps, simultaneous
// and rolled-off drops, 2 % and 5 % noise) and each seed, it simulates a
// log with compare/simulate (exact), analyses it with the library call
// job.Analyze, as `ridemodes analyze` does, and sets every figure (natural
// frequency, damping ratio, pitch per bounce and node of both modes, the
// back-calculated front and rear rates and damping) beside the truth: the
// damped model's modes (compare.Vehicle.DampedModes) and the car's rates
// and damping. It prints Markdown tables for the README (per route and per
// condition: bias, sd and worst of the errors, the share within 2 stated
// sd, the RMS of error/sd, flagged and missing estimates), judges the
// acceptance figures of the honest-answers issue (PASS or FAIL), and writes
// every case to a CSV file with -csv. With -bound it prints instead the
// Cramer-Rao bound of the natural frequencies and damping ratios of the
// selected cars' 5-minute rig logs (bound.go), the sd no unbiased
// estimator can beat on such a log.
//
// Seeds are 10000 car + 100 condition + s (car and condition counted from
// 1 in the full lists, s from -first-seed), so one case can be rebuilt with
// `ridemodes simulate --seed`. It lives under testdata so that `go test
// ./...` and `go vet ./...` leave it out; run it from the repository root:
//
//	go run ./testdata/calibration [-seeds 12] [-cars 'hatch,suv'] [-conds 'rig-5min-*'] [-csv cases.csv]
package main

import (
	"context"
	"encoding/csv"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"runtime"
	"slices"
	"strconv"
	"sync"
	"time"

	"github.com/ridemodes/ridemodes/ingest"
)

func main() {
	if err := run(); err != nil {
		fmt.Fprintln(os.Stderr, "calibration:", err)
		os.Exit(1)
	}
}

func run() error {
	carSel := flag.String("cars", "", "comma-separated patterns of the cars to run (default: all; see -list)")
	condSel := flag.String("conds", "", "comma-separated patterns of the conditions to run, e.g. 'rig-5min-*,drop-*' (default: all)")
	seeds := flag.Int("seeds", 12, "seeds per car and condition (1-99)")
	firstSeed := flag.Int("first-seed", 1, "the first seed's number s")
	workers := flag.Int("workers", 2, "cases analysed at once")
	longRateHz := flag.Float64("long-rate", 128, "sample rate of the hour-long rig logs in Hz")
	csvPath := flag.String("csv", "", "write every case's figures to this CSV file")
	list := flag.Bool("list", false, "list the cars with their true modes, and the conditions, then stop")
	bound := flag.Bool("bound", false, "print the Cramer-Rao bound of the natural frequencies and damping ratios "+
		"of the selected cars under the selected 5-minute rig conditions, then stop")
	flag.Parse()
	if flag.NArg() > 0 {
		return fmt.Errorf("unexpected argument %q (options only; -h lists them)", flag.Arg(0))
	}
	if *seeds < 1 || *firstSeed < 1 || *firstSeed+*seeds-1 > 99 {
		return fmt.Errorf("-first-seed and -seeds must give seeds within 1-99 (got %d from %d)", *seeds, *firstSeed)
	}
	if *workers < 1 {
		return fmt.Errorf("-workers must be at least 1 (got %d)", *workers)
	}
	allConds := conditionsFor(*longRateHz)
	if *list {
		return listAll(os.Stdout, allConds)
	}
	selCars, err := selectNames(*carSel, cars, func(c car) string { return c.name })
	if err != nil {
		return fmt.Errorf("-cars: %w", err)
	}
	selConds, err := selectNames(*condSel, allConds, func(c condition) string { return c.name })
	if err != nil {
		return fmt.Errorf("-conds: %w", err)
	}

	if *bound {
		return printBounds(os.Stdout, selCars, selConds, allConds, *firstSeed)
	}
	dir, err := os.MkdirTemp("", "ridemodes-calibration-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(dir)
	jobs, err := makeJobs(dir, selCars, selConds, allConds, *firstSeed, *seeds)
	if err != nil {
		return err
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	start := time.Now()
	results := runAll(ctx, dir, jobs, *workers)
	wall := time.Since(start)
	if ctx.Err() != nil {
		return fmt.Errorf("interrupted after %s", wall.Round(time.Second))
	}
	if *csvPath != "" {
		if err := ingest.WriteAtomic(*csvPath, func(w io.Writer) error { return writeCSV(w, results) }); err != nil {
			return err
		}
	}
	report(os.Stdout, results, selConds, len(selCars), *seeds, *workers, wall)
	return nil
}

// makeJobs writes each car's setups into dir and returns the cases, in
// car, condition, seed order.
func makeJobs(dir string, selCars []car, selConds, allConds []condition, firstSeed, seeds int) ([]caseJob, error) {
	var jobs []caseJob
	for _, c := range selCars {
		setups := map[bool]string{}
		for endPair, keep := range map[bool][]int{false: c.allSensors(), true: c.endSensors()} {
			p := fmt.Sprintf("%s/%s-%d.toml", dir, c.name, len(keep))
			if err := os.WriteFile(p, []byte(c.setupTOML(keep)), 0o644); err != nil {
				return nil, err
			}
			setups[endPair] = p
		}
		for _, cond := range selConds {
			for s := firstSeed; s < firstSeed+seeds; s++ {
				jobs = append(jobs, caseJob{car: c, cond: cond, seed: seedOf(c, cond, allConds, s),
					setupPath: setups[cond.endPair]})
			}
		}
	}
	return jobs, nil
}

// seedOf returns the seed of car c under cond for the sweep's seed number s:
// 10000 car + 100 condition + s, car and condition counted from 1 in the
// full lists.
func seedOf(c car, cond condition, allConds []condition, s int) uint64 {
	ci := slices.IndexFunc(cars, func(x car) bool { return x.name == c.name }) + 1
	ki := slices.IndexFunc(allConds, func(x condition) bool { return x.name == cond.name }) + 1
	return uint64(10000*ci + 100*ki + s)
}

// runAll runs the jobs on workers goroutines, the longest logs first, and
// returns the results in the jobs' order. Progress goes to stderr.
func runAll(ctx context.Context, dir string, jobs []caseJob, workers int) []caseResult {
	order := make([]int, len(jobs))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int {
		ca, cb := jobs[a].cond, jobs[b].cond
		return -cmpFloat(ca.durationS*ca.rateHz, cb.durationS*cb.rateHz)
	})
	results := make([]caseResult, len(jobs))
	next := make(chan int)
	var wg sync.WaitGroup
	var mu sync.Mutex
	done := 0
	start := time.Now()
	for range workers {
		wg.Go(func() {
			for i := range next {
				results[i] = jobs[i].run(ctx, dir)
				mu.Lock()
				done++
				if done%max(1, len(jobs)/20) == 0 || done == len(jobs) {
					fmt.Fprintf(os.Stderr, "%d of %d cases, %s\n", done, len(jobs), time.Since(start).Round(time.Second))
				}
				mu.Unlock()
			}
		})
	}
	for _, i := range order {
		if ctx.Err() != nil {
			break
		}
		next <- i
	}
	close(next)
	wg.Wait()
	return results
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// report writes the tables and the acceptance lines.
func report(w io.Writer, results []caseResult, conds []condition, nCars, seeds, workers int, wall time.Duration) {
	fmt.Fprintf(w, "Calibration sweep: %d cars x %d conditions x %d seeds = %d logs, %d workers, wall time %s (%s, %d CPUs).\n\n",
		nCars, len(conds), seeds, len(results), workers, wall.Round(time.Second), runtime.Version(), runtime.NumCPU())
	var routes []*group
	for _, route := range []string{routeRig, routeDrop} {
		g := gather(route, results, func(c condition) bool { return c.route == route }, nil)
		if g.logs > 0 {
			routes = append(routes, g)
			writeFigureTable(w, g)
		}
	}
	fmt.Fprintln(w, "Errors: estimate - truth, in % of the truth for frequencies, rates and damping, in the value's unit otherwise; "+
		"z = error / stated sd; flagged and missing estimates are not in n.")
	fmt.Fprintln(w)
	var byCond []*group
	for _, c := range conds {
		byCond = append(byCond, gather(c.name, results, func(x condition) bool { return x.name == c.name }, nil))
	}
	writeConditionTable(w, byCond)
	writeCriteria(w, results, routes)
	for _, g := range byCond {
		for _, m := range g.failedMsgs {
			fmt.Fprintf(w, "failed: %s\n", m)
		}
	}
}

// writeCSV writes a row per case and figure (a failed case: one row with
// its error).
func writeCSV(w io.Writer, results []caseResult) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"car", "route", "condition", "seed", "figure", "truth", "estimate", "sd", "z", "flagged", "resampled", "error"})
	num := func(x float64) string {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return ""
		}
		return strconv.FormatFloat(x, 'g', 8, 64)
	}
	for _, r := range results {
		head := []string{r.job.car.name, r.job.cond.route, r.job.cond.name, strconv.FormatUint(r.job.seed, 10)}
		if r.err != nil {
			cw.Write(append(head, "", "", "", "", "", "", strconv.FormatBool(r.resampled), r.err.Error()))
			continue
		}
		for _, e := range r.estimates {
			cw.Write(append(slices.Clone(head), e.fig.key, num(e.truth), num(e.est), num(e.sd), num(e.z()),
				strconv.FormatBool(e.flagged), strconv.FormatBool(r.resampled), ""))
		}
	}
	cw.Flush()
	return cw.Error()
}

// listAll writes the cars with their true modes and the conditions.
func listAll(w io.Writer, conds []condition) error {
	for _, c := range cars {
		ms, err := c.vehicle.DampedModes()
		if err != nil {
			return fmt.Errorf("car %s: %w", c.name, err)
		}
		fmt.Fprintf(w, "%-7s %s; sensors at %v m\n", c.name, c.what, c.sensorsXM)
		for _, m := range ms {
			fmt.Fprintf(w, "        %-6s %.3f Hz, damping ratio %.3f, pitch per bounce %.4f rad/m, node %.2f m\n",
				m.Label, m.NaturalFrequencyHz, m.DampingRatio, m.PitchPerBounceRadPerM, m.NodeM)
		}
	}
	for _, c := range conds {
		fmt.Fprintf(w, "%-18s %s\n", c.name, c.describe())
	}
	return nil
}
