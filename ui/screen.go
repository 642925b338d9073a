package ui

import "fmt"

// Screen is one of the app's five screens, in the order of the work.
type Screen int

// The screens.
const (
	ScreenSites Screen = iota
	ScreenIntake
	ScreenTally
	ScreenOutcome
	ScreenTransfer
	numScreens
)

// Screens lists the screens in tab order.
func Screens() []Screen {
	return []Screen{ScreenSites, ScreenIntake, ScreenTally, ScreenOutcome, ScreenTransfer}
}

func (s Screen) String() string {
	switch s {
	case ScreenSites:
		return "sites"
	case ScreenIntake:
		return "intake"
	case ScreenTally:
		return "tally"
	case ScreenOutcome:
		return "outcome"
	case ScreenTransfer:
		return "transfer"
	}
	return fmt.Sprintf("Screen(%d)", int(s))
}

// Title is the screen's name on its tab.
func (s Screen) Title() string {
	switch s {
	case ScreenSites:
		return "Sites"
	case ScreenIntake:
		return "Receive bale"
	case ScreenTally:
		return "Tally pulls"
	case ScreenOutcome:
		return "Outcome"
	case ScreenTransfer:
		return "Transfer"
	}
	return s.String()
}
