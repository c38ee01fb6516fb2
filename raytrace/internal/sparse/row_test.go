package sparse

import (
	"reflect"
	"slices"
	"testing"
)

func TestRow(t *testing.T) {
	a := Row[int64]{Col: []int32{1, 4, 7}, Val: []int64{2, 3, 5}}
	b := Row[int64]{Col: []int32{0, 4, 9}, Val: []int64{1, 10, 1}}
	want := Row[int64]{Col: []int32{0, 1, 4, 7, 9}, Val: []int64{1, 2, 13, 5, 1}}
	if got := a.Add(b); !reflect.DeepEqual(got, want) {
		t.Errorf("a + b = %+v, want %+v", got, want)
	} else if cap(got.Col) != len(got.Col) || cap(got.Val) != len(got.Val) {
		t.Errorf("a + b holds %d columns in room for %d: tally rows are kept to the end of a run", len(got.Col), cap(got.Col))
	}
	if a.At(4) != 3 || a.At(5) != 0 || a.Sum() != 10 || a.Len() != 3 {
		t.Errorf("At, Sum, Len: %v %v %v %v", a.At(4), a.At(5), a.Sum(), a.Len())
	}
	if !a.Increasing(8) || a.Increasing(7) || (&Row[int64]{Col: []int32{2, 2}, Val: []int64{1, 1}}).Increasing(9) {
		t.Error("Increasing")
	}
}

// Transposing twice gives the rows back; the transpose's columns increase.
func TestTranspose(t *testing.T) {
	rows := []Row[float64]{{Col: []int32{1, 2}, Val: []float64{0.5, 0.25}}, {Col: []int32{0}, Val: []float64{1}}, {}}
	tr := Transpose(rows)
	if want := (Row[float64]{Col: []int32{0}, Val: []float64{0.5}}); !reflect.DeepEqual(tr[1], want) || tr[2].At(0) != 0.25 || tr[0].At(1) != 1 {
		t.Errorf("transpose %+v", tr)
	}
	back := Transpose(tr)
	for i := range rows {
		if !slices.Equal(back[i].Col, rows[i].Col) || !slices.Equal(back[i].Val, rows[i].Val) {
			t.Errorf("row %d: %+v, want %+v", i, back[i], rows[i])
		}
	}
}
