package render

import "sync"

// Scratch buffers a map's drawing uses and drops when it is done (the DEM
// resampled to the pixels, their states and shading; the rasterizers'
// cells): a map of 1600 px takes about 35 MB of them, which the next map
// (the demo draws six, two at a time) takes from these pools instead of
// fresh zeroed memory. A sync.Pool lets the collector drop what no map has
// used for two cycles.
var (
	f32Pool    sync.Pool // *[]float32
	u8Pool     sync.Pool // *[]uint8
	canvasPool sync.Pool // *canvas
)

// getF32 returns a slice of n float32 of any content.
func getF32(n int) []float32 {
	if p, ok := f32Pool.Get().(*[]float32); ok {
		if cap(*p) >= n {
			return (*p)[:n]
		}
	}
	return make([]float32, n)
}

func putF32(s []float32) {
	if cap(s) > 0 {
		f32Pool.Put(&s)
	}
}

// getU8 returns n zero bytes.
func getU8(n int) []uint8 {
	if p, ok := u8Pool.Get().(*[]uint8); ok {
		if cap(*p) >= n {
			s := (*p)[:n]
			clear(s)
			return s
		}
	}
	return make([]uint8, n)
}

func putU8(s []uint8) {
	if cap(s) > 0 {
		u8Pool.Put(&s)
	}
}
