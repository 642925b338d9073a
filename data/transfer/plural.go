package transfer

// plural is one when n is 1, many otherwise: "1 conflict", "2 conflicts".
func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}
