package analysis

import (
	"bytes"
	"encoding/csv"
	"math"
	"reflect"
	"strconv"
	"testing"
)

// Any text either reads as view factors in [0, 1] or fails with an error;
// what reads, written back as pairs with the shortest exact numbers (as
// hemiray's writers do), reads back the same.
func FuzzReadViewFactors(f *testing.F) {
	f.Add([]byte("from,a,b,ambient\na,0,0.5,0.5\nb,0.25,0,0.75\n"))
	f.Add([]byte("from,to,F,stderr\na,b,0.5,0.01\na,ambient,0.5,0.01\n"))
	f.Add([]byte("\xef\xbb\xbffrom,to,F\n\"a,b\",c,1\n"))
	f.Add([]byte("from,to,F\n\"\r\r\n\",,0")) // a line break inside a name is refused
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := ReadViewFactors(bytes.NewReader(data), "fuzz.csv")
		if err != nil {
			return
		}
		var b bytes.Buffer
		w := csv.NewWriter(&b)
		w.Write([]string{"from", "to", "F"})
		for _, x := range g {
			if !(x.F >= 0 && x.F <= 1) || math.IsNaN(x.F) {
				t.Fatalf("factor %v read", x.F)
			}
			w.Write([]string{x.From, x.To, strconv.FormatFloat(x.F, 'g', -1, 64)})
		}
		w.Flush()
		g2, err := ReadViewFactors(&b, "again.csv")
		if err != nil || !reflect.DeepEqual(g, g2) {
			t.Fatalf("round trip: %v\n%v\n%v", err, g, g2)
		}
	})
}
