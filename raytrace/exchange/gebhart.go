package exchange

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// denseExchangeAreas returns the total exchange areas S_ij = A_i·ℱ_ij = ε_i A_i B_ij
// in m², symmetrised (they are equal up to round-off when F is reciprocal),
// and each node's exchange area with the ambient ε_i A_i B_i,amb, where B
// are Gebhart's absorption factors B = (I − F R)⁻¹ [F E | F_amb]. Multiply
// by Sigma for radiative conductances in W/K⁴. Dense: at most
// ConductorDenseLimit nodes.
func denseExchangeAreas(area, eps []float64, F []Row, ambient []float64) (S [][]float64, toAmbient []float64, err error) {
	n := len(area)
	if len(eps) != n || len(F) != n || (ambient != nil && len(ambient) != n) {
		return nil, nil, fmt.Errorf("exchange: %d areas, %d emissivities, %d rows of F", n, len(eps), len(F))
	}
	for i := range F {
		if !F[i].Increasing(n) {
			return nil, nil, fmt.Errorf("exchange: row %d of F: columns must increase within [0, %d), one value each", i, n)
		}
	}
	if n > ConductorDenseLimit {
		return nil, nil, fmt.Errorf("exchange: exchange factors of %d nodes need a dense %d² solve; the limit is %d", n, n, ConductorDenseLimit)
	}
	m := mat.NewDense(n, n, nil)
	rhs := mat.NewDense(n, n+1, nil)
	for i := range n {
		m.Set(i, i, 1)
		for k, c := range F[i].Col {
			j, f := int(c), F[i].Val[k]
			m.Set(i, j, m.At(i, j)-f*(1-eps[j]))
			rhs.Set(i, j, f*eps[j])
		}
		if ambient != nil {
			rhs.Set(i, n, ambient[i])
		}
	}
	var lu mat.LU
	lu.Factorize(m)
	var B mat.Dense
	if err := lu.SolveTo(&B, false, rhs); err != nil {
		return nil, nil, fmt.Errorf("exchange: Gebhart factors: %w", err)
	}
	S = make([][]float64, n)
	toAmbient = make([]float64, n)
	for i := range n {
		S[i] = make([]float64, n)
		toAmbient[i] = eps[i] * area[i] * B.At(i, n)
	}
	for i := range n {
		for j := i; j < n; j++ {
			s := 0.5 * (eps[i]*area[i]*B.At(i, j) + eps[j]*area[j]*B.At(j, i))
			S[i][j], S[j][i] = s, s
		}
	}
	return S, toAmbient, nil
}
