package cell

import "couplet/mdo/external"

// Programs returns the approval of external programs for this script:
// every program when the script is trusted (--trust-script), otherwise
// only those the user named with --allow-program. Pass it to
// external.New; a program it does not approve is refused there.
func (e *Env) Programs() *external.Gate { return e.host.Programs }
