package gap

// DefaultRule names the price rule a run uses when none is given
// (instances.RuleChooser). With the knapsack relaxation it is the
// deflected subgradient: on the 36 type C, D and E instances
// (testdata/bench/gap-yagiura-cde.csv, 2 workers, a shared machine at load
// 2-7) its mean bound gap to the reference was 4.2 % after 1 s and
// 0.038 % after 10 s, against 7.2 % and 0.050 % for the subgradient rule
// and 9.7 % and 1.8 % for the volume rule; its plans were the closest at
// 10 s (mean deviation 0.238 %). After 60 s on c/d/e801600 volume's bound
// was level (0.003 % against 0.004 %). The figures are in the notes of
// the measurement (README, Price rules). The choice relaxation was not
// measured and keeps the engine's default.
func (m *Model) DefaultRule() string {
	if m.Opt.Relaxation == KnapsackRelaxation {
		return "deflected"
	}
	return ""
}
