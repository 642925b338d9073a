package ui

import "errors"

var errEmpty = errors.New("ui: empty field")
