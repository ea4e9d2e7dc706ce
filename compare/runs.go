package compare

// RunJSON is one log of a pooled analysis (several logs of one car in one
// state): its log and the modes identified from it alone.
type RunJSON struct {
	Log      *LogRef    `json:"log"`
	Modes    []ModeJSON `json:"modes"`
	Warnings []string   `json:"warnings"`
}

// PoolingJSON says how the runs of a pooled analysis were combined and
// whether they agree.
type PoolingJSON struct {
	// Runs is the number of logs pooled; Method names the weighting.
	Runs   int    `json:"runs"`
	Method string `json:"method"`
	// Significance is the chi-square test's level below which the runs
	// count as inconsistent.
	Significance float64            `json:"significance"`
	Checks       []PoolingCheckJSON `json:"checks"`
}

// PoolingCheckJSON is the consistency test of one value of one mode over the
// runs (see body.PoolCheck).
type PoolingCheckJSON struct {
	Label      string  `json:"label"`
	Value      string  `json:"value"`
	ChiSquare  float64 `json:"chi_square"`
	DOF        int     `json:"dof"`
	PValue     float64 `json:"p_value"`
	Consistent bool    `json:"consistent"`
	// SDScale is the factor the pooled sd was widened by (1 when consistent).
	SDScale float64 `json:"sd_scale"`
	// OutlierLog is the log that disagrees most with the others (null when
	// the runs agree); OutlierZ its difference from the others' mean in sd.
	OutlierLog *string  `json:"outlier_log"`
	OutlierZ   *float64 `json:"outlier_z"`
}
