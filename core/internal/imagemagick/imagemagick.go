// Package imagemagick finds ImageMagick's convert (Debian package
// imagemagick), the general-purpose image tool the tests use as an outside
// reference: images it draws, distorts or decodes are measured by Sagitta.
package imagemagick

import (
	"os/exec"
	"strings"
)

// Convert returns the path of ImageMagick's convert, or "" if it is not
// installed. A plain "convert" on the PATH counts only if it says it is
// ImageMagick.
func Convert() string {
	for _, name := range []string{"convert-im6.q16", "convert-im6", "magick", "convert"} {
		path, err := exec.LookPath(name)
		if err != nil {
			continue
		}
		out, err := exec.Command(path, "-version").Output()
		if err == nil && strings.Contains(string(out), "ImageMagick") {
			return path
		}
	}
	return ""
}
