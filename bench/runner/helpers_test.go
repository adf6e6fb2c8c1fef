package runner

import (
	"fmt"
)

func fmtInts(x []int) string { return fmt.Sprint(x) }
