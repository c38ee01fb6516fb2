package report

// factorNames are how the files of one kind of factor matrix are named:
// view factors F_ij (the first surface a ray meets), or absorption factors
// B_ij (where a ray followed through reflections is absorbed).
type factorNames struct {
	stem   string // file names: STEM.csv, STEM_pairs.csv, STEM_smoothed.mtx, …
	symbol string // the column of the value in the pairs files
	words  string // for the Matrix Market comment line
}

func namesFor(absorption bool) factorNames {
	if absorption {
		return factorNames{"absorption", "B", "absorption factors"}
	}
	return factorNames{"viewfactors", "F", "view factors"}
}
