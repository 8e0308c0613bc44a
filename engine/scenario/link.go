package scenario

import (
	"bytes"
	"compress/flate"
	"encoding/base64"
	"errors"
	"io"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Limits of share links (contract 2).
const (
	// LinkPrefix starts every link code of this format version.
	LinkPrefix = "s1."
	// MaxLinkLen is the longest link code EncodeLink writes, in bytes (all ASCII). Longer
	// codes break in mail and chat programs; such a scenario travels as a file instead.
	MaxLinkLen = 8000
	// MaxLinkInput is the longest text DecodeLink reads, in bytes; longer text is refused
	// before any decoding.
	MaxLinkInput = 4 << 20
)

// EncodeLink returns the share code of s: LinkPrefix followed by the base64url encoding
// without padding (RFC 4648 section 5) of the raw DEFLATE compression (RFC 1951, best
// compression) of the compact canonical JSON of s. The page puts it after '#' in its
// address. Special cases are: an invalid s gives its *FieldError; a code longer than
// MaxLinkLen gives a *LinkError that suggests saving the scenario as a file.
func EncodeLink(s Scenario) (string, error) {
	return EncodeLinkFits(s, MaxLinkLen)
}

// EncodeLinkFits is EncodeLink with the longest acceptable code chosen by the caller
// (maxLen <= 0 means no limit).
func EncodeLinkFits(s Scenario, maxLen int) (string, error) {
	if err := s.Validate(); err != nil {
		return "", err
	}
	return linkCode(s.compact(), maxLen)
}

// EncodeLink is EncodeLinkFits without checking the scenario again.
func (c Checked) EncodeLink(maxLen int) (string, error) { return linkCode(c.s.compact(), maxLen) }

func linkCode(data []byte, maxLen int) (string, error) {
	tooLong := func(length string) error {
		return &LinkError{Reason: sprintf("the link would be longer than the %d characters that travel safely%s; save the scenario as a file and share the file instead", maxLen, length)}
	}
	// Compression stops as soon as its output cannot fit: a large own spectrum would
	// otherwise be compressed in full (seconds) only to be refused.
	z := cappedBuffer{max: -1}
	if maxLen > 0 {
		z.max = (maxLen - len(LinkPrefix)) * 3 / 4
	}
	w, err := flate.NewWriter(&z, flate.BestCompression)
	if err != nil {
		return "", &LinkError{Reason: err.Error()}
	}
	if _, err = w.Write(data); err == nil {
		err = w.Close()
	}
	switch {
	case err == errCapped:
		return "", tooLong("")
	case err != nil:
		return "", &LinkError{Reason: err.Error()}
	}
	code := LinkPrefix + base64.RawURLEncoding.EncodeToString(z.Bytes())
	if maxLen > 0 && len(code) > maxLen {
		return "", tooLong(sprintf(" (%d characters)", len(code)))
	}
	return code, nil
}

var errCapped = errors.New("scenario: link output over its cap")

// cappedBuffer refuses writes beyond max bytes (max < 0: no cap).
type cappedBuffer struct {
	bytes.Buffer
	max int
}

func (c *cappedBuffer) Write(p []byte) (int, error) {
	if c.max >= 0 && c.Len()+len(p) > c.max {
		return 0, errCapped
	}
	return c.Buffer.Write(p)
}

// DecodeLink reads a scenario from a share link: a whole address (everything up to and
// including the first '#' is ignored), "#s1.…" or "s1.…". Surrounding and embedded white
// space (a link wrapped across lines) and trailing '=' padding are ignored. Nothing in the
// text is trusted: its length is capped at MaxLinkInput before any work, the inflated size
// at MaxBytes while inflating, and the scenario is checked as Decode checks a file.
// Special cases are: a problem with the link itself is a *LinkError naming it (empty, an
// unknown version, not base64url, not deflate, cut off, too large); a readable link whose
// scenario is invalid gives Decode's *FieldError unchanged.
func DecodeLink(text string) (Scenario, error) {
	if len(text) > MaxLinkInput {
		return Scenario{}, &LinkError{Reason: sprintf("the text is %d bytes long, more than the %d bytes (4 MB) a link may have", len(text), MaxLinkInput)}
	}
	code := strings.TrimSpace(text)
	if i := strings.IndexByte(code, '#'); i >= 0 {
		code = code[i+1:]
	}
	code = strings.Map(func(r rune) rune {
		if unicode.IsSpace(r) {
			return -1
		}
		return r
	}, code)
	if code == "" {
		return Scenario{}, &LinkError{Reason: "it is empty: there is no scenario code after the '#'"}
	}
	if !strings.HasPrefix(code, LinkPrefix) {
		if v, ok := versionPrefix(code); ok {
			return Scenario{}, &LinkError{Reason: sprintf("it is of version %q, which this program does not read (it reads %q links)", clip(v, 20), LinkPrefix)}
		}
		return Scenario{}, &LinkError{Reason: sprintf("it does not start with %q, so it is not a scenario link", LinkPrefix)}
	}
	payload := strings.TrimRight(code[len(LinkPrefix):], "=")
	if payload == "" {
		return Scenario{}, &LinkError{Reason: "it is cut off: nothing follows " + LinkPrefix}
	}
	for i := 0; i < len(payload); i++ {
		c := payload[i]
		if !(c >= 'A' && c <= 'Z' || c >= 'a' && c <= 'z' || c >= '0' && c <= '9' || c == '-' || c == '_') {
			return Scenario{}, &LinkError{Reason: sprintf("it is not base64url text: character %d after %q is %q (only A-Z, a-z, 0-9, '-' and '_' may appear)", i+1, LinkPrefix, firstRune(payload[i:]))}
		}
	}
	if len(payload)%4 == 1 {
		return Scenario{}, &LinkError{Reason: "it is cut off: its base64url text ends in the middle of a byte"}
	}
	raw, err := base64.RawURLEncoding.DecodeString(payload)
	if err != nil {
		return Scenario{}, &LinkError{Reason: "it is not base64url text: " + err.Error()}
	}
	data, err := inflate(raw)
	if err != nil {
		return Scenario{}, err
	}
	return Decode(data)
}

func firstRune(s string) string {
	r, _ := utf8.DecodeRuneInString(s)
	return string(r)
}

// versionPrefix recognizes "s<digits>." (a link code of some other version).
func versionPrefix(code string) (string, bool) {
	if len(code) < 3 || code[0] != 's' {
		return "", false
	}
	i := 1
	for i < len(code) && code[i] >= '0' && code[i] <= '9' {
		i++
	}
	if i == 1 || i >= len(code) || code[i] != '.' {
		return "", false
	}
	return code[:i+1], true
}

// inflate decompresses raw DEFLATE data, reading at most MaxBytes + 1 bytes of output so
// that a small link that would inflate to gigabytes (a deflate bomb) costs no more than
// MaxBytes of memory before it is refused.
func inflate(raw []byte) ([]byte, error) {
	src := bytes.NewReader(raw)
	r := flate.NewReader(src)
	defer r.Close()
	data, err := io.ReadAll(io.LimitReader(r, MaxBytes+1))
	if len(data) > MaxBytes {
		return nil, &LinkError{Reason: sprintf("it inflates to more than %d bytes (4 MB), the limit of a scenario; it was refused before inflating the rest", MaxBytes)}
	}
	if err != nil {
		var ce flate.CorruptInputError
		if errors.As(err, &ce) {
			return nil, &LinkError{Reason: sprintf("it is not deflate-compressed data (corrupt at byte %d)", int64(ce))}
		}
		if errors.Is(err, io.ErrUnexpectedEOF) {
			return nil, &LinkError{Reason: "it is cut off: the compressed data ends early"}
		}
		return nil, &LinkError{Reason: "it is not deflate-compressed data: " + err.Error()}
	}
	if src.Len() > 0 {
		return nil, &LinkError{Reason: sprintf("it has %d stray bytes after the compressed scenario", src.Len())}
	}
	return data, nil
}
