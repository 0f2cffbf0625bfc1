package scheduling

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Constants of the generator. The ranges of processing times, weights and
// due dates are those of the OR-Library weighted tardiness sets
// (Potts & Van Wassenhove 1985; Crauwels, Potts & Van Wassenhove 1998), as
// described in ../shared/benchmarks/scheduling/SOURCES.md §1.3 and checked
// there against the published files; the grid of TF and RDD values is
// from the same place. That draws are independent and integer-uniform, and
// that a negative due date becomes 0, is from memory (the share of zero due
// dates in wt40, 645 of 5,000, matches clipping the draw at 0).
const (
	genProcessingHi = 100 // p_j ~ U{1..100} (SOURCES.md §1.3)
	genWeightHi     = 10  // w_j ~ U{1..10} (SOURCES.md §1.3)
	genMaxJobs      = 1_000_000
)

// GenerateConfig describes a random instance. The zero value of a field
// is taken literally where 0 makes sense (TF, RDD, ReleaseFactor,
// EligibleShare) and means the default elsewhere.
type GenerateConfig struct {
	Jobs     int // number of jobs (at least 1)
	Machines int // total machines, at least Classes (0: one per class)
	Classes  int // machine classes (0: 1); machines are spread evenly, the first classes get the remainder
	// TF is the tardiness factor and RDD the relative range of due dates
	// (the OR-Library sets use 0.2, 0.4, 0.6, 0.8 and 1.0 for both).
	TF, RDD float64
	// MaxProcessing is the largest processing time (0: 100, as published);
	// smaller values give short horizons for tests and MIP exports.
	MaxProcessing int
	// MaxWeight is the largest weight (0: 10, as published).
	MaxWeight int
	// ReleaseFactor ρ >= 0 draws release dates r_j ~ U{0..⌊ρ·P/m⌋}; 0
	// gives no release dates.
	ReleaseFactor float64
	// EligibleShare in [0,1] is the probability that a job may use only
	// some classes (needs Classes >= 2); the others may use every class.
	EligibleShare float64
	Objective     Objective
	Seed          uint64
}

// Benchmark5000 is the large configuration of the performance
// checks: 5,000 jobs on 20 machines in 3 classes (7, 7 and 6 machines) with
// release dates over the first half of the per-machine workload, 30 % of
// the jobs restricted to some classes, TF = RDD = 0.6.
func Benchmark5000(seed uint64) GenerateConfig {
	return GenerateConfig{Jobs: 5000, Machines: 20, Classes: 3, TF: 0.6, RDD: 0.6,
		ReleaseFactor: 0.5, EligibleShare: 0.3, Seed: seed}
}

// Generate returns a random instance in the style of the OR-Library
// weighted tardiness generator (Potts & Van Wassenhove 1985, used by
// Crauwels, Potts & Van Wassenhove 1998 for the wt40/wt50/wt100 sets),
// extended to machine classes, release dates and eligibility:
//
//   - p_j ~ U{1..MaxProcessing} (published: 100), w_j ~ U{1..MaxWeight}
//     (published: 10);
//   - with P = Σ_j p_j and m the total number of machines, the due date is
//     drawn from U{⌈P'(1−TF−RDD/2)⌉..⌊P'(1−TF+RDD/2)⌋} with P' = P/m (the
//     published recipe is the case m = 1), and set to 0 when negative;
//   - release dates (this package's recipe, not published): r_j ~
//     U{0..⌊ρ·P/m⌋} with ρ = ReleaseFactor, and then the due date is raised
//     to at least r_j + p_j, since a job that cannot be on time anyway
//     would only add a constant to the objective;
//   - eligibility (this package's recipe): with probability EligibleShare a
//     job gets a random non-empty proper subset of the classes (each class
//     kept with probability 1/2, drawn again until neither empty nor full).
//
// Ids are J1..Jn and K1..Kc; names are left empty. The draws use a PCG
// generator seeded with Seed, so the same configuration always gives the
// same instance. Generate panics on a configuration that cannot give an
// instance (no job, fewer machines than classes, negative factors, more
// than a million jobs): those are programming errors; the command line
// checks its options before calling it.
func Generate(cfg GenerateConfig) *Instance {
	cfg = cfg.withDefaults()
	if err := cfg.check(); err != nil {
		panic(err)
	}
	rng := rand.New(rand.NewPCG(cfg.Seed, 0x7363686564)) // second word: "sched"
	uniform := func(lo, hi int) int { return lo + rng.IntN(hi-lo+1) }
	in := &Instance{Name: fmt.Sprintf("gen-n%d-m%d-c%d-s%d", cfg.Jobs, cfg.Machines, cfg.Classes, cfg.Seed), Objective: cfg.Objective}
	for k := 0; k < cfg.Classes; k++ {
		m := cfg.Machines / cfg.Classes
		if k < cfg.Machines%cfg.Classes {
			m++
		}
		in.Classes = append(in.Classes, Class{ID: fmt.Sprintf("K%d", k+1), Machines: m})
	}
	in.Jobs = make([]Job, cfg.Jobs)
	total := 0
	for j := range in.Jobs {
		in.Jobs[j] = Job{ID: fmt.Sprintf("J%d", j+1), Processing: uniform(1, cfg.MaxProcessing)}
		total += in.Jobs[j].Processing
	}
	for j := range in.Jobs {
		in.Jobs[j].Weight = uniform(1, cfg.MaxWeight)
	}
	per := float64(total) / float64(cfg.Machines)
	lo := int(math.Ceil(per * (1 - cfg.TF - cfg.RDD/2)))
	hi := int(math.Floor(per * (1 - cfg.TF + cfg.RDD/2)))
	hi = max(hi, lo)
	for j := range in.Jobs {
		in.Jobs[j].Due = min(max(0, uniform(lo, hi)), MaxCSVNumber)
	}
	if cfg.ReleaseFactor > 0 {
		rmax := min(int(math.Floor(cfg.ReleaseFactor*per)), MaxCSVNumber-cfg.MaxProcessing)
		for j := range in.Jobs {
			jb := &in.Jobs[j]
			jb.Release = uniform(0, rmax)
			jb.Due = min(max(jb.Due, jb.Release+jb.Processing), MaxCSVNumber)
		}
	}
	if cfg.EligibleShare > 0 && cfg.Classes >= 2 {
		for j := range in.Jobs {
			if rng.Float64() >= cfg.EligibleShare {
				continue
			}
			for {
				var el []int
				for k := 0; k < cfg.Classes; k++ {
					if rng.IntN(2) == 1 {
						el = append(el, k)
					}
				}
				if len(el) > 0 && len(el) < cfg.Classes {
					in.Jobs[j].Eligible = el
					break
				}
			}
		}
	}
	return in
}

// check reports a configuration Generate cannot use.
func (cfg GenerateConfig) check() error {
	switch {
	case cfg.Jobs < 1 || cfg.Jobs > genMaxJobs:
		return fmt.Errorf("scheduling: generate: %d jobs, want 1..%d", cfg.Jobs, genMaxJobs)
	case cfg.Classes < 1 || cfg.Machines < cfg.Classes:
		return fmt.Errorf("scheduling: generate: %d machines in %d classes, want at least one machine per class", cfg.Machines, cfg.Classes)
	case cfg.MaxProcessing < 1 || cfg.MaxProcessing > MaxCSVNumber/genMaxJobs || cfg.MaxWeight < 1 || cfg.MaxWeight > MaxCSVNumber:
		return fmt.Errorf("scheduling: generate: largest processing time %d and weight %d, want 1..%d and 1..%d",
			cfg.MaxProcessing, cfg.MaxWeight, MaxCSVNumber/genMaxJobs, MaxCSVNumber)
	case !(cfg.TF >= 0 && cfg.TF <= 2) || !(cfg.RDD >= 0 && cfg.RDD <= 2):
		return fmt.Errorf("scheduling: generate: TF %v and RDD %v, want numbers in 0..2", cfg.TF, cfg.RDD)
	case !(cfg.ReleaseFactor >= 0 && cfg.ReleaseFactor <= 10):
		return fmt.Errorf("scheduling: generate: release factor %v, want a number in 0..10", cfg.ReleaseFactor)
	case !(cfg.EligibleShare >= 0 && cfg.EligibleShare <= 1):
		return fmt.Errorf("scheduling: generate: eligible share %v, want a number in 0..1", cfg.EligibleShare)
	case cfg.Objective != WeightedTardiness && cfg.Objective != WeightedCompletion:
		return fmt.Errorf("scheduling: generate: unknown objective %d", cfg.Objective)
	}
	return nil
}

// GenerateChecked is Generate for configurations from users: it returns an
// error instead of panicking.
func GenerateChecked(cfg GenerateConfig) (*Instance, error) {
	if err := cfg.withDefaults().check(); err != nil {
		return nil, err
	}
	return Generate(cfg), nil
}

// withDefaults fills the fields whose zero value means the default.
func (cfg GenerateConfig) withDefaults() GenerateConfig {
	if cfg.Classes == 0 {
		cfg.Classes = 1
	}
	if cfg.Machines == 0 {
		cfg.Machines = cfg.Classes
	}
	if cfg.MaxProcessing == 0 {
		cfg.MaxProcessing = genProcessingHi
	}
	if cfg.MaxWeight == 0 {
		cfg.MaxWeight = genWeightHi
	}
	return cfg
}
