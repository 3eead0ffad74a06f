package catalog

import (
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
)

// parseJSON reads the JSON that SQLite's json_array and json_group_array
// write: arrays, strings, numbers, null (and true/false for completeness).
// Numbers become float64, arrays []any. It is a small, allocation-light
// replacement for encoding/json on the import's hot path.
func parseJSON(s string) (any, error) {
	p := jsonParser{s: s}
	v, err := p.value()
	if err != nil {
		return nil, err
	}
	p.space()
	if p.i != len(p.s) {
		return nil, p.errorf("trailing data")
	}
	return v, nil
}

type jsonParser struct {
	s string
	i int
}

func (p *jsonParser) errorf(format string, a ...any) error {
	return fmt.Errorf("json at offset %d: %s", p.i, fmt.Sprintf(format, a...))
}

func (p *jsonParser) space() {
	for p.i < len(p.s) {
		switch p.s[p.i] {
		case ' ', '\t', '\n', '\r':
			p.i++
		default:
			return
		}
	}
}

func (p *jsonParser) value() (any, error) {
	p.space()
	if p.i >= len(p.s) {
		return nil, p.errorf("unexpected end")
	}
	switch c := p.s[p.i]; {
	case c == '[':
		return p.array()
	case c == '"':
		return p.str()
	case c == 'n':
		return nil, p.word("null")
	case c == 't':
		return true, p.word("true")
	case c == 'f':
		return false, p.word("false")
	case c == '-' || c >= '0' && c <= '9':
		j := p.i
		for p.i < len(p.s) {
			c := p.s[p.i]
			if c == '-' || c == '+' || c == '.' || c == 'e' || c == 'E' || c >= '0' && c <= '9' {
				p.i++
				continue
			}
			break
		}
		f, err := strconv.ParseFloat(p.s[j:p.i], 64)
		if err != nil {
			return nil, p.errorf("bad number %q", p.s[j:p.i])
		}
		return f, nil
	}
	return nil, p.errorf("unexpected %q", p.s[p.i])
}

func (p *jsonParser) word(w string) error {
	if len(p.s)-p.i < len(w) || p.s[p.i:p.i+len(w)] != w {
		return p.errorf("bad literal")
	}
	p.i += len(w)
	return nil
}

func (p *jsonParser) str() (any, error) {
	j := p.i
	p.i++
	escaped := false
	for p.i < len(p.s) {
		switch p.s[p.i] {
		case '\\':
			escaped = true
			p.i += 2
			continue
		case '"':
			p.i++
			if !escaped {
				return p.s[j+1 : p.i-1], nil
			}
			var out string
			if err := json.Unmarshal([]byte(p.s[j:p.i]), &out); err != nil {
				return nil, p.errorf("bad string: %v", err)
			}
			return out, nil
		}
		p.i++
	}
	return nil, errors.New("json: unterminated string")
}

func (p *jsonParser) array() (any, error) {
	p.i++ // [
	out := []any{}
	p.space()
	if p.i < len(p.s) && p.s[p.i] == ']' {
		p.i++
		return out, nil
	}
	for {
		v, err := p.value()
		if err != nil {
			return nil, err
		}
		out = append(out, v)
		p.space()
		if p.i >= len(p.s) {
			return nil, p.errorf("unterminated array")
		}
		switch p.s[p.i] {
		case ',':
			p.i++
		case ']':
			p.i++
			return out, nil
		default:
			return nil, p.errorf("expected , or ]")
		}
	}
}
