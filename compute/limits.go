package compute

// Bounds that keep a hostile or runaway memo from eating the machine, and
// the guards that keep every figure of a report finite (see README.md,
// "Limits").

// maxYearNotes bounds the labels listed for one year of a schedule. Fix
// (hostile input): an alternative with thousands of one-time lines over a
// long study period listed every label in every year, and a 40 KB memo
// grew a 1.3 GB HTML report; past this many labels a year reads "and other
// amounts".
const maxYearNotes = 12

// moreNotes ends a year's list of labels that was cut at maxYearNotes.
const moreNotes = "and other amounts"

// addNote appends label to a year's notes, at most maxYearNotes of them.
func addNote(notes []string, label string) []string {
	switch {
	case len(notes) < maxYearNotes:
		return append(notes, label)
	case len(notes) == maxYearNotes:
		return append(notes, moreNotes)
	}
	return notes
}
