//go:build !linux

package analyze

import "time"

// cpuTime is unknown here (-1); see the Linux one in stages_bench_test.go.
func cpuTime() time.Duration { return -1 }
