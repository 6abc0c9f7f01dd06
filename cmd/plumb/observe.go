package main

import (
	"errors"
	"flag"
	"fmt"
	"strings"

	"github.com/plumbdyn/plumb"
)

// distanceFlags are the flags of plumb trust that choose the distance:
// --observe (the components compared) and --scale (their units).
type distanceFlags struct {
	observe string
	scales  scaleList
}

// addDistanceFlags registers --observe and --scale on fs.
func addDistanceFlags(fs *flag.FlagSet, d *distanceFlags) {
	fs.StringVar(&d.observe, "observe", "", "comma-separated state `NAMES` to compare (the quantities that matter); the distance is taken over these only (default: every component)")
	fs.Var(&d.scales, "scale", "divide the difference of state NAME by VALUE before the norm, given as `NAME=VALUE` (> 0, repeatable), so that components in different units compare")
}

// scaleList is the repeatable --scale flag.
type scaleList struct{ paramList }

// Set parses name=value.
func (l *scaleList) Set(s string) error {
	name, val, ok := strings.Cut(s, "=")
	name = strings.TrimSpace(name)
	if !ok || name == "" {
		return fmt.Errorf("want name=value, e.g. z=10")
	}
	v, err := parseFinite(val)
	if err != nil {
		return fmt.Errorf("scale of %s: %v", name, err)
	}
	l.paramList = append(l.paramList, paramSetting{name: name, value: v})
	return nil
}

// distance returns the plumb.Distance the flags ask for, checked against
// sys's state names (plumb.Distance.PerComponent); a bad name or value is a
// usage error naming the flag and the item.
func (d *distanceFlags) distance(cl *call, sys *plumb.System) (plumb.Distance, error) {
	var dist plumb.Distance
	if cl.sh.given["observe"] {
		for _, name := range strings.Split(d.observe, ",") {
			name = strings.TrimSpace(name)
			if name == "" {
				return dist, usagef("--observe %q: an empty name in the list (states: %s)", d.observe, strings.Join(sys.States, ", "))
			}
			dist.Observe = append(dist.Observe, name)
		}
	}
	for _, s := range d.scales.paramList {
		dist.Scales = append(dist.Scales, plumb.Scale{Name: s.name, Value: s.value})
	}
	if _, err := dist.PerComponent(sys.States); err != nil {
		var de *plumb.DistanceError
		if !errors.As(err, &de) {
			return dist, err
		}
		if de.Field == "Observe" {
			return dist, usagef("--observe %s: %s: %s", d.observe, de.Name, de.Why)
		}
		s := d.scales.paramList[de.Index]
		return dist, usagef("--scale %s=%s: %s", s.name, formatFloat(s.value), de.Why)
	}
	return dist, nil
}

// scaleJSON is one --scale as echoed in the settings.
type scaleJSON struct {
	Name  string  `json:"name"`
	Value float64 `json:"value"`
}

// echo returns the observed names (every state when --observe is not
// given) and the scales as given, for the JSON settings.
func echoDistance(sys *plumb.System, dist plumb.Distance) (observe []string, scales []scaleJSON) {
	observe = dist.Observe
	if len(observe) == 0 {
		observe = append([]string(nil), sys.States...)
	}
	scales = []scaleJSON{}
	for _, s := range dist.Scales {
		scales = append(scales, scaleJSON{Name: s.Name, Value: s.Value})
	}
	return observe, scales
}
