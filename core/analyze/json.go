package analyze

import (
	"encoding/json"
	"io"
)

// WriteJSON writes res (a Result, or the command-line tool's Result with
// the answer of a series beside it) as the JSON contract (README, "The JSON
// contract"),
// indented by one space, with a final newline. The command-line tool
// (`sagitta analyze --json`) and the web page both call it, so their files
// are identical.
func WriteJSON(w io.Writer, res any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", " ")
	return enc.Encode(res)
}
