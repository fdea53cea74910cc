package output

import (
	"errors"
	"fmt"
)

// ErrMapInput is matched (errors.Is) by the errors that reject a map file
// given as input: a partial file that belongs to other settings, shard files
// that do not fit together (other plan, axes, observables or method, or
// overlapping points), missing points in a merge, a file that is not a
// socmap map. The command line maps it to exit status 2.
var ErrMapInput = errors.New("map input does not fit")

// ErrMapBusy (which also matches ErrMapInput) is returned when a map file
// cannot be opened because another process holds it open for writing
// (libhdf5 locks files it writes): typically a socmap run still computing it.
var ErrMapBusy = &mapInputError{msg: "map file in use"}

type mapInputError struct {
	msg  string
	busy bool
}

func (e *mapInputError) Is(target error) bool { return target == ErrMapBusy && e.busy }

func (e *mapInputError) Error() string { return e.msg }
func (e *mapInputError) Unwrap() error { return ErrMapInput }

func inputErrorf(format string, a ...any) error {
	return &mapInputError{msg: fmt.Sprintf(format, a...)}
}
