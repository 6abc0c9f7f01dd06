package runio

import (
	"bufio"
	"io"
	"strconv"
	"strings"
)

// WriteCSV writes a run as CSV that ReadCSV reads back to the same bits:
// a header of the time and state names (quoted where a name holds a comma,
// a quote or surrounding spaces), then one row per time, each number in
// the shortest form that round-trips. Periods and scales are not written.
func WriteCSV(w io.Writer, r *Run) error {
	bw := bufio.NewWriterSize(w, 64<<10)
	bw.WriteString(csvName(r.TimeName))
	for _, n := range r.Names {
		bw.WriteByte(',')
		bw.WriteString(csvName(n))
	}
	bw.WriteByte('\n')
	d := len(r.Names)
	var num []byte
	for i, t := range r.T {
		num = strconv.AppendFloat(num[:0], t, 'g', -1, 64)
		for _, v := range r.Y[i*d : (i+1)*d] {
			num = append(num, ',')
			num = strconv.AppendFloat(num, v, 'g', -1, 64)
		}
		num = append(num, '\n')
		if _, err := bw.Write(num); err != nil {
			return err
		}
	}
	return bw.Flush()
}

func csvName(s string) string {
	if strings.ContainsAny(s, ",\"\r\n") || strings.TrimSpace(s) != s || strings.HasPrefix(s, "\ufeff") {
		return `"` + strings.ReplaceAll(s, `"`, `""`) + `"`
	}
	return s
}
