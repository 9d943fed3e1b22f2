package text_test

import (
	"fmt"

	"kinword/internal/text"
)

func ExamplePipeline_Terms() {
	p, _ := text.NewPipeline(text.English)
	fmt.Println(p.Terms("Reporting a burst water-main on the high street", ""))
	// Output: [report burst water main high street]
}
