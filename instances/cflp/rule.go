package cflp

// DefaultRule names the price rule a run uses when none is given
// (instances.RuleChooser). For split demand with the site-aggregate
// relaxation it is the deflected subgradient. Measured with bench --rule
// --marks on the 41 rows of testdata/bench/cflp-orlib.csv (2 workers, a
// shared machine at load 5-9): its mean bound gap to the optimum after
// 1 s was 0.034 % on cap41-cap134 and capa3, capa4 (subgradient 0.097 %,
// volume 0.154 %) and 0.21 % on capa1, capa2 (subgradient 0.98 %, volume
// 2.4 %); after 10 s it was level with the subgradient rule (0.008 % on
// all 41) and after 60 s on capa1, capa2 within 0.005 points of the
// volume rule (0.055 % against 0.051 %). Every rule found the optimal
// plan of all 41. Single-source models and the site relaxation were not
// measured and keep the engine's default.
func (m *Model) DefaultRule() string {
	if !m.Opt.SingleSource && m.Opt.Relaxation == AggregateRelaxation {
		return "deflected"
	}
	return ""
}
