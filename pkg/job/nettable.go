package job

// RateTable returns the table of a network's rate coefficients as the
// terminal and the report show it: a row per (T, P), the temperature and
// the pressure (p converts Pa to the unit named pUnit), each well's rate
// coefficient to every other well and to every product in s-1 (4
// significant digits; "-" where the point was refused or merged), and the
// eigenvalue separation ("refused" where there is none).
func (r *NetworkRatesResult) RateTable(p func(float64) float64, pUnit string) (header []string, rows [][]string) {
	header = []string{"T / K", "P / " + pUnit}
	for _, from := range r.Wells {
		for _, to := range r.Wells {
			if to != from {
				header = append(header, from+"→"+to)
			}
		}
		for _, pr := range r.Products {
			header = append(header, from+"→"+pr)
		}
	}
	header = append(header, "separation")
	for i, t := range r.Temperatures {
		for j, pa := range r.Pressures {
			row := []string{num(t), num(p(pa))}
			k, kx := r.K[i][j], r.KProducts[i][j]
			for a := range r.Wells {
				for b := range r.Wells {
					if a == b {
						continue
					}
					if k == nil {
						row = append(row, "-")
					} else {
						row = append(row, num(k[b][a]))
					}
				}
				for x := range r.Products {
					if kx == nil {
						row = append(row, "-")
					} else {
						row = append(row, num(kx[x][a]))
					}
				}
			}
			if k == nil {
				row = append(row, "refused")
			} else {
				row = append(row, num(r.Separation[i][j]))
			}
			rows = append(rows, row)
		}
	}
	return header, rows
}

// YieldTable returns the table of the source's yields per captured
// molecule (nil without a source): a row per (T, P), the yield stabilised
// in each well and carried to each product, and k_capture in cm3
// molecule-1 s-1 where every fragment is described; "-" where the point
// was refused or merged.
func (r *NetworkRatesResult) YieldTable(p func(float64) float64, pUnit string) (header []string, rows [][]string) {
	src := r.Source
	if src == nil {
		return nil, nil
	}
	header = []string{"T / K", "P / " + pUnit}
	for _, w := range r.Wells {
		header = append(header, "into "+w)
	}
	for _, pr := range r.Products {
		header = append(header, "to "+pr)
	}
	if src.KCapture != nil {
		header = append(header, "k_capture / cm3 molecule-1 s-1")
	}
	for i, t := range r.Temperatures {
		for j, pa := range r.Pressures {
			row := []string{num(t), num(p(pa))}
			if src.Stabilised[i][j] == nil {
				for range len(r.Wells) + len(r.Products) {
					row = append(row, "-")
				}
			} else {
				for _, y := range src.Stabilised[i][j] {
					row = append(row, num(y))
				}
				for _, y := range src.Activated[i][j] {
					row = append(row, num(y))
				}
			}
			if src.KCapture != nil {
				row = append(row, num(src.KCapture[i][j]))
			}
			rows = append(rows, row)
		}
	}
	return header, rows
}
