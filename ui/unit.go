package ui

import "gioui.org/unit"

func unitDp(v float32) unit.Dp { return unit.Dp(v) }
