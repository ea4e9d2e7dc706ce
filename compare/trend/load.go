package trend

import (
	"context"
	"errors"
	"fmt"
	"strings"

	"github.com/ridemodes/ridemodes/compare/store"
)

// Load reads the runs of car (every car when empty) from the existing store
// at target and builds their trend view. A store without runs, or without
// runs of car, is an error that names the cars it has.
func Load(ctx context.Context, target, car string) (c *Campaign, err error) {
	s, err := store.OpenExisting(ctx, target)
	if err != nil {
		return nil, err
	}
	defer func() { err = errors.Join(err, s.Close()) }()
	runs, err := s.Runs(ctx, store.Filter{Car: car})
	if err != nil {
		return nil, err
	}
	if len(runs) == 0 {
		cars, err := s.Cars(ctx)
		if err != nil {
			return nil, err
		}
		if len(cars) == 0 {
			return nil, errors.New("the store holds no runs yet: record some with analyze --store or batch --store")
		}
		return nil, fmt.Errorf("the store has no runs of car %q; its cars: %s", car, strings.Join(cars, ", "))
	}
	return Build(car, runs), nil
}
