package plane

// Det3 returns the determinant of a 3×3 matrix by cofactor expansion along
// its first row.
func Det3(a [3][3]float64) float64 {
	return a[0][0]*(a[1][1]*a[2][2]-a[1][2]*a[2][1]) -
		a[0][1]*(a[1][0]*a[2][2]-a[1][2]*a[2][0]) +
		a[0][2]*(a[1][0]*a[2][1]-a[1][1]*a[2][0])
}

// Inverse3 returns the inverse of a 3×3 matrix by cofactors (the adjugate
// over the determinant) and its determinant det = Det3(a). ok is false, and
// inv zero, when det is zero or not finite; a caller that needs a better
// conditioned matrix tests det against its own scale.
func Inverse3(a [3][3]float64) (inv [3][3]float64, det float64, ok bool) {
	det = Det3(a)
	if det == 0 || !finite(det) {
		return [3][3]float64{}, det, false
	}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			i1, i2 := (j+1)%3, (j+2)%3
			j1, j2 := (i+1)%3, (i+2)%3
			inv[i][j] = (a[i1][j1]*a[i2][j2] - a[i1][j2]*a[i2][j1]) / det
		}
	}
	return inv, det, true
}
