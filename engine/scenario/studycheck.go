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
