package scenario

// ValidateStudy checks s.Study alone against the rest of s (the paths it names and their
// domains), without building the laws: for callers that validated the rest of s already and
// change only the study, such as the page's views. Special cases are: a nil study is valid;
// errors are *FieldError values naming the study field.
func (s Scenario) ValidateStudy() error {
	if s.Study == nil {
		return nil
	}
	return s.validateStudy()
}

// WithStudy returns c with its study replaced by st, checked alone (ValidateStudy): the
// laws are those c built already, so a page that changes only the settings of its views
// checks nothing else. Special cases are: a nil st removes the study; an invalid st is
// the *FieldError of ValidateStudy, and c is returned unchanged.
func (c Checked) WithStudy(st *Study) (Checked, error) {
	s := c.s
	s.Study = st
	if err := s.ValidateStudy(); err != nil {
		return c, err
	}
	c.s = s
	return c, nil
}
