package transition_test

import (
	"fmt"
	"math"

	"glidereach/reach/transition"
)

// A half turn at 30° bank from a glide at 33 m/s TAS sinking 3.7 m/s.
func ExampleNewTurn() {
	t, err := transition.NewTurn(30, 33, 3.7)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("n %.3f, speed %.1f m/s, radius %.0f m, half turn %.1f s, %.0f m lost\n",
		t.N, t.TAS, t.Radius, t.Time(math.Pi), t.HeightLost(math.Pi))
	// Output: n 1.155, speed 35.5 m/s, radius 222 m, half turn 19.7 s, 90 m lost
}
