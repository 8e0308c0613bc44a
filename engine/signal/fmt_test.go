package signal

import "strconv"

func formatG(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
