package csvfile

// Float reads one cell, record i (0-based) of the named column, as a
// number by the rules and with the messages of Floats. It serves columns
// that only some rows fill, such as a ward's optional factors, which the
// caller reads cell by cell after checking the cell is not blank.
func (t *Table) Float(i int, name string) (float64, error) {
	c, err := t.mustIndex(name)
	if err != nil {
		return 0, err
	}
	return parseCell(t.Lines[i], name, t.Records[i][c])
}
