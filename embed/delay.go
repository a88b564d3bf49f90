package embed

import (
	"errors"
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// Delay returns the delay-coordinate vectors of window k of a spacing
// sequence: row n is (d_n, d_{n+1}, …, d_{n+k−1}) / d̄ for n = 0, …,
// len(spacings)−k, where d̄ is the mean spacing. Dividing by d̄ makes the
// vectors dimensionless, so clouds from patterns in different units (or of
// different lattice constants) are comparable.
func Delay(spacings []float64, k int) (*mat.Dense, error) {
	if k < 1 {
		return nil, fmt.Errorf("delay window %d: must be at least 1", k)
	}
	rows := len(spacings) - k + 1
	if rows < 1 {
		return nil, fmt.Errorf("delay window %d: %d spacings give no vector", k, len(spacings))
	}
	mean, err := meanSpacing(spacings)
	if err != nil {
		return nil, err
	}
	data := make([]float64, rows*k)
	for n := range rows {
		for j := range k {
			data[n*k+j] = spacings[n+j] / mean
		}
	}
	return mat.NewDense(rows, k, data), nil
}

// errMean is wrapped when the spacings have no positive mean.
var errMean = errors.New("the mean spacing is not positive")

// meanSpacing returns the mean of the spacings, which must be positive.
func meanSpacing(spacings []float64) (float64, error) {
	var sum float64
	for _, d := range spacings {
		sum += d
	}
	mean := sum / float64(len(spacings))
	if !(mean > 0) || mean > 1e300 {
		return 0, fmt.Errorf("%w: %v", errMean, mean)
	}
	return mean, nil
}
