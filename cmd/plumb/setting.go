package main

import (
	"errors"

	"github.com/plumbdyn/plumb/integrate"
)

// settingUsage is the usage error for err, an SDK settings error of the
// run a command is about to make (integrate.Settings.Validate or
// lyap.Settings.Validate): the SDK's reason under the name of the flag that
// set the field (flags maps field names to flag names). The rule is the
// SDK's; the CLI only names the flag. An error of a field no flag sets is
// a refusal of the settings as a whole (still exit 2).
func settingUsage(err error, flags map[string]string) error {
	var se *integrate.SettingError
	if errors.As(err, &se) {
		if name, ok := flags[se.Field]; ok {
			v := se.Value
			if f, isFloat := v.(float64); isFloat {
				v = formatFloat(f)
			}
			return usagef("--%s %v: %s", name, v, se.Reason)
		}
	}
	return usagef("the settings were refused: %v", err)
}
