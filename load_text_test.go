package plumb

import (
	"errors"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// flowFile is a one-variable flow with the given variable name,
// description and rate, and a parameter named param.
func flowFile(name, desc, rate, param string) string {
	return `{"kind": "flow", "description": "` + desc + `",
  "parameters": [{"name": "` + param + `", "value": 1}],
  "variables": [{"name": "` + name + `", "start": 1, "rate": "` + rate + `"}]}`
}

// Text that shows otherwise than it reads is refused, naming the field;
// names in one script, and Latin with Greek as mathematics writes it, are
// accepted. The classes are those of UTS #39 Sect. 5.2 and UAX #9 Table 4.
func TestSystemFileMisleadingText(t *testing.T) {
	cases := []struct {
		name, file string
		field      string // "" means the file loads
		says       string
	}{
		{"plain", flowFile("x", "a loop", "-k*x", "k"), "", ""},
		{"greek with latin", flowFile("Δx", "a loop", "-σ_k*Δx", "σ_k"), "", ""},
		{"one script, cyrillic", flowFile("скорость", "a loop", "-k*скорость", "k"), "", ""},
		{"han with latin", flowFile("温度x", "a loop", "-k*温度x", "k"), "", ""},
		{"override in description", flowFile("x", "loop\u202e(evil)", "-k*x", "k"), "description", "U+202E"},
		{"escaped isolate in a rate", flowFile("x", "a loop", `-k*x\u2066`, "k"), "variables[0].rate", "U+2066"},
		{"mark in a name", flowFile("x\u200f", "a loop", "-k*x", "k"), "variables[0].name", "U+200F"},
		{"latin and cyrillic in one name", flowFile("x", "a loop", "-kаppa*x", "kаppa"), "parameters[0].name", "Cyrillic and Latin"},
		{"latin with a look-alike greek", flowFile("x", "a loop", "-kοn*x", "kοn"), "parameters[0].name", "looks like the Latin \"o\""},
		{"two names alike", flowFile("x", "a loop", "-х*x", "х"), "variables[0].name", "looks like"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := LoadSystem(strings.NewReader(c.file))
			if c.field == "" {
				require.NoError(t, err)
				return
			}
			require.Error(t, err)
			var fe *FileError
			require.True(t, errors.As(err, &fe), "err %v is not a *FileError", err)
			assert.True(t, errors.Is(err, ErrSystemFile))
			assert.Equal(t, c.field, fe.Field)
			assert.Contains(t, err.Error(), c.says)
		})
	}
}
