package plan_test

import (
	"context"
	"testing"

	"glidereach/reach/plan"
)

// BenchmarkReachFlatFields is the library's footprint use case end to end:
// the trainer from 1500 m over flat ground in still air (801² cells) with
// seven fields around the edge of its reach, each judged by its own
// backward run (go test ./reach/plan -run '^$' -bench ReachFlatFields
// -benchmem -count 3).
func BenchmarkReachFlatFields(b *testing.B) {
	s := trainer(b, nil)
	var fields []plan.Field
	for i, d := range []float64{3000, 6000, 8000, 9500, 10500, 11500, 14000} {
		p := east(b, -0.5, -24.5+float64(i)*0.001, d)
		fields = append(fields, plan.Field{Name: string(rune('A' + i)), Lat: p.Lat, Lon: p.Lon})
	}
	req := plan.ReachRequest{Setup: s, Ground: plan.Ground{}, Lat: -0.5, Lon: -24.5, Alt: 1500, Fields: fields}
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		if _, err := plan.Reach(context.Background(), req); err != nil {
			b.Fatal(err)
		}
	}
}
