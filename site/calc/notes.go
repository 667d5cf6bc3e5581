package calc

import "zport/site/view"

// engineNotes are what the engine says about the base answer: values that
// are not finite and why, conditioning, structural zeros.
var engineNotes = Analysis{
	Key:     "notes",
	Title:   "Notes from the engine",
	Section: notesSection,
}

func notesSection(w *view.Writer, c *Context) {
	if len(c.Resp.Notes) == 0 {
		return
	}
	w.Section(c.ID, "notes", "Notes from the engine")
	w.Notes("", c.Resp.Notes)
	w.Close("section")
}
