package lotsizing

// DefaultRule names the price rule a run uses when none is given
// (instances.RuleChooser): the subgradient rule, which is also the
// engine's default. Measured with bench --rule --marks on the 14 rows of
// testdata/bench/lotsizing-ttm.csv (2 workers, a shared machine at load
// 3-7): the mean bound gap to the optimum after 1 s and 10 s was 1.67 %
// and 1.47 % (subgradient), 1.68 % and 1.48 % (deflected), 1.98 % and
// 1.79 % (volume), 1.52 % and 1.45 % (boxstep); after 60 s on g57, g69
// and g72 the first three were level at 0.16 %. Boxstep's bound leads
// early, but it ends the run as soon as its model shows the dual solved,
// which cost the plans (mean deviation 0.99 % after 10 s against 0.51 %).
// The plans of the other rules differ by less than their scatter from
// run to run, so no rule earned the change.
func (m *Model) DefaultRule() string { return "subgradient" }
