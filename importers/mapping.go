package importers

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"os"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"

	"partsieve/catalog"
	"partsieve/catalog/units"
)

// Mapping is a parsed mapping file (`partsieve import --map FILE`): how to
// read a sheet the header recognizer cannot read alone. The file is TOML;
// every key is optional and an unknown key is an error that names the key
// and its line.
//
//	# which sheet of a workbook, and where its header row is (1-based row
//	# number as the spreadsheet program shows it; 0 = no header row, then
//	# the [columns] keys are column letters A, B, ...)
//	sheet      = "Diodes"
//	header_row = 3
//
//	# defaults for every row
//	kind     = "diode"        # diode | fuse | mosfet (as --kind)
//	type     = "schottky"     # rectifier schottky zener tvs | n p | FF F M T TT
//	supplier = "Example Parts" # when the sheet has no supplier column
//	currency = "EUR"          # when neither a column, header nor cell tells
//	fuse_std = "iec"          # iec | ul | blade
//
//	# header texts to ignore (not listed as unknown columns)
//	ignore = ["Internal code", "Notes"]
//
//	[columns]
//	# header text as written (case and spacing ignored) = field name ...
//	"Sperrspannung" = "vrrm"
//	# ... or a table: field, and optionally unit (the default unit of the
//	# cells), pick (magnitude | upper | lower | signed: which number of a
//	# range or signed value), qty (price columns: the break quantity),
//	# currency (price columns) and conditions (test conditions)
//	"Strom"     = { field = "ifav", unit = "A" }
//	"Uth"       = { field = "vgs_th", unit = "V", pick = "upper" }
//	"Preis 100" = { field = "price", qty = 100, currency = "EUR" }
//	"Ron 4V5"   = { field = "rdson2", unit = "mΩ", conditions = { rdson2_vgs = "4.5 V" } }
//
//	[constants]
//	# values for every row that lacks the field: numbers with units as
//	# text, booleans, words
//	rdson_vgs = "10 V"
//	mfr       = "Nordwind Semiconductor"
//	rohs      = true
//
// Field names are the canonical names of `partsieve fields` (catalog fields
// and the offer and kind targets of ExtraFields).
type Mapping struct {
	File      string
	Sheet     string
	HeaderRow int  // 1-based; 0 = no header row; meaningful when HasRow is set
	HasRow    bool // header_row given
	Kind      catalog.Kind
	Type      string
	Supplier  string
	Currency  string
	FuseStd   string
	columns   map[string]Column // normalised header text (or column letter) -> column
	ignore    map[string]bool
	consts    []constant
}

type mappingFile struct {
	Sheet     string                    `toml:"sheet"`
	HeaderRow *int                      `toml:"header_row"`
	Kind      string                    `toml:"kind"`
	Type      string                    `toml:"type"`
	Supplier  string                    `toml:"supplier"`
	Currency  string                    `toml:"currency"`
	FuseStd   string                    `toml:"fuse_std"`
	Ignore    []string                  `toml:"ignore"`
	Columns   map[string]toml.Primitive `toml:"columns"`
	Constants map[string]toml.Primitive `toml:"constants"`
}

type columnSpec struct {
	Field      string            `toml:"field"`
	Unit       string            `toml:"unit"`
	Pick       string            `toml:"pick"`
	Qty        int64             `toml:"qty"`
	Currency   string            `toml:"currency"`
	Conditions map[string]string `toml:"conditions"`
}

// LoadMapping reads and checks a mapping file.
func LoadMapping(path string) (*Mapping, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("mapping file %s: %w", path, err)
	}
	return ParseMapping(path, data)
}

// ParseMapping checks a mapping file held in memory; name appears in
// messages.
func ParseMapping(name string, data []byte) (*Mapping, error) {
	var raw mappingFile
	md, err := toml.NewDecoder(bytes.NewReader(data)).Decode(&raw)
	if err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			return nil, fmt.Errorf("%s:%d: %s", name, pe.Position.Line, pe.Message)
		}
		return nil, fmt.Errorf("%s: %v", name, err)
	}
	m := &Mapping{File: name, Sheet: raw.Sheet, Supplier: strings.TrimSpace(raw.Supplier),
		columns: map[string]Column{}, ignore: map[string]bool{}}
	errAt := func(key toml.Key, format string, a ...any) error {
		return fmt.Errorf("%s:%d: %s: %s", name, keyLine(data, key), keyName(key), fmt.Sprintf(format, a...))
	}
	if raw.HeaderRow != nil {
		if *raw.HeaderRow < 0 {
			return nil, errAt(toml.Key{"header_row"}, "must be 0 (no header row) or a row number from 1")
		}
		m.HeaderRow, m.HasRow = *raw.HeaderRow, true
	}
	if raw.Kind != "" {
		k := catalog.Kind(strings.ToLower(strings.TrimSpace(raw.Kind)))
		if !validKind(k) {
			return nil, errAt(toml.Key{"kind"}, "%q is not diode, fuse or mosfet", raw.Kind)
		}
		m.Kind = k
	}
	if raw.Type != "" {
		t, ok := normType(m.Kind, raw.Type)
		if !ok {
			return nil, errAt(toml.Key{"type"}, "%q is not a type of %s (types: %s)", raw.Type, kindOrAll(m.Kind), typeList(m.Kind))
		}
		m.Type = t
	}
	if raw.Currency != "" {
		c, err := normCurrency(raw.Currency)
		if err != nil {
			return nil, errAt(toml.Key{"currency"}, "%v", err)
		}
		m.Currency = c
	}
	if raw.FuseStd != "" {
		s := strings.ToLower(strings.TrimSpace(raw.FuseStd))
		if s != "iec" && s != "ul" && s != "blade" {
			return nil, errAt(toml.Key{"fuse_std"}, "%q is not iec, ul or blade", raw.FuseStd)
		}
		m.FuseStd = s
	}
	noHeader := m.HasRow && m.HeaderRow == 0
	colKey := func(k string) (string, error) {
		if noHeader {
			u := strings.ToUpper(strings.TrimSpace(k))
			if _, ok := letterIndex(u); !ok {
				return "", fmt.Errorf("with header_row = 0 the keys are column letters (A, B, ..., AA)")
			}
			return u, nil
		}
		return headerKey(k), nil
	}
	for _, h := range raw.Ignore {
		k, err := colKey(h)
		if err != nil {
			return nil, errAt(toml.Key{"ignore"}, "%q: %v", h, err)
		}
		m.ignore[k] = true
	}

	keys := make([]string, 0, len(raw.Columns))
	for k := range raw.Columns {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, h := range keys {
		key := toml.Key{"columns", h}
		spec := columnSpec{}
		switch md.Type("columns", h) {
		case "String":
			if err := md.PrimitiveDecode(raw.Columns[h], &spec.Field); err != nil {
				return nil, errAt(key, "%v", err)
			}
		case "Hash", "Inline Table":
			if err := md.PrimitiveDecode(raw.Columns[h], &spec); err != nil {
				return nil, errAt(key, "%v", err)
			}
		default:
			return nil, errAt(key, "give a field name or a table { field = ..., unit = ... }")
		}
		col, err := spec.column(h)
		if err != nil {
			return nil, errAt(key, "%v", err)
		}
		k, err := colKey(h)
		if err != nil {
			return nil, errAt(key, "%v", err)
		}
		m.columns[k] = col
	}

	ckeys := make([]string, 0, len(raw.Constants))
	for k := range raw.Constants {
		ckeys = append(ckeys, k)
	}
	sort.Strings(ckeys)
	for _, f := range ckeys {
		key := toml.Key{"constants", f}
		var v any
		if err := md.PrimitiveDecode(raw.Constants[f], &v); err != nil {
			return nil, errAt(key, "%v", err)
		}
		c, err := makeConstant(f, v)
		if err != nil {
			return nil, errAt(key, "%v", err)
		}
		m.consts = append(m.consts, c)
	}
	if und := md.Undecoded(); len(und) > 0 {
		return nil, errAt(und[0], "unknown key (keys: sheet, header_row, kind, type, supplier, currency, fuse_std, ignore, [columns], [constants]; a column table takes field, unit, pick, qty, currency, conditions)")
	}
	return m, nil
}

// column checks a [columns] entry and turns it into a Column.
func (s columnSpec) column(header string) (Column, error) {
	field := strings.ToLower(strings.TrimSpace(s.Field))
	if field == "" {
		return Column{}, errors.New("no field")
	}
	if !knownTarget(field) {
		return Column{}, fmt.Errorf("unknown field %q (see partsieve fields)", s.Field)
	}
	c := Column{Header: header, Field: field, Unit: strings.TrimSpace(s.Unit), Qty: s.Qty, mapped: true}
	if c.Unit != "" {
		d := targetDim(field)
		if d == units.None {
			return Column{}, fmt.Errorf("field %s takes no unit", field)
		}
		dims := units.UnitDim(c.Unit)
		if len(dims) == 0 {
			return Column{}, fmt.Errorf("unknown unit %q", c.Unit)
		}
		if !hasDim(dims, d) {
			return Column{}, fmt.Errorf("unit %q is a %s, %s wants a %s", c.Unit, dims[0], field, d)
		}
	}
	if s.Pick != "" {
		p, ok := map[string]units.Pick{"magnitude": units.Magnitude, "upper": units.Upper, "lower": units.Lower, "signed": units.Signed}[strings.ToLower(s.Pick)]
		if !ok {
			return Column{}, fmt.Errorf("pick %q is not magnitude, upper, lower or signed", s.Pick)
		}
		c.pick, c.hasPick = p, true
	}
	if s.Qty < 0 || (s.Qty > 0 && field != fPrice) {
		return Column{}, errors.New("qty applies to price columns and must be at least 1")
	}
	if s.Currency != "" {
		cur, err := normCurrency(s.Currency)
		if err != nil {
			return Column{}, err
		}
		c.Currency = cur
	}
	names := make([]string, 0, len(s.Conditions))
	for k := range s.Conditions {
		names = append(names, k)
	}
	sort.Strings(names)
	for _, k := range names {
		cf, ok := catalog.FieldByName(k)
		if !ok || cf.Type != catalog.Number {
			return Column{}, fmt.Errorf("condition %q is not a numeric field", k)
		}
		if condTarget(field, cf.Dim) != cf.Name {
			return Column{}, fmt.Errorf("condition %s is not a test condition of %s", k, field)
		}
		v, err := units.Parse(s.Conditions[k], cf.Dim, cf.Pick)
		if err != nil {
			return Column{}, fmt.Errorf("condition %s: %v", k, err)
		}
		c.Conds = append(c.Conds, Condition{Field: cf.Name, Dim: cf.Dim, Value: v, Text: s.Conditions[k]})
	}
	return c, nil
}

// makeConstant checks a [constants] entry.
func makeConstant(name string, v any) (constant, error) {
	f, ok := catalog.FieldByName(name)
	if !ok {
		return constant{}, fmt.Errorf("unknown field %q (see partsieve fields)", name)
	}
	c := constant{field: f.Name}
	switch f.Name {
	case "kind", "type", "mpn":
		return constant{}, fmt.Errorf("%s cannot be a constant (kind and type are top-level keys)", f.Name)
	}
	str, isStr := v.(string)
	switch f.Type {
	case catalog.Number:
		switch x := v.(type) {
		case int64:
			str = strconv.FormatInt(x, 10)
		case float64:
			str = strconv.FormatFloat(x, 'g', -1, 64)
		case string:
		default:
			return constant{}, fmt.Errorf("give a number or a value with unit, such as \"10 V\"")
		}
		n, err := units.Parse(str, f.Dim, f.Pick)
		if err != nil {
			return constant{}, err
		}
		c.num, c.isNum = n, true
	case catalog.Bool:
		var b bool
		switch x := v.(type) {
		case bool:
			b = x
		case string:
			var err error
			if b, err = parseBool(x); err != nil {
				return constant{}, err
			}
		default:
			return constant{}, errors.New("give true or false")
		}
		c.b = &b
	default:
		if !isStr {
			return constant{}, errors.New("give a text value")
		}
		c.text = strings.TrimSpace(str)
		switch f.Name {
		case "lifecycle":
			lc, err := parseLifecycle(str)
			if err != nil {
				return constant{}, err
			}
			c.text = lc
		case "fuse_std":
			if s := fuseStdCell(str); s != "" {
				c.text = s
			} else {
				return constant{}, fmt.Errorf("%q is not iec, ul or blade", str)
			}
		case "rerate":
			s, err := parseRerate(str)
			if err != nil {
				return constant{}, err
			}
			c.text = s
		}
	}
	return c, nil
}

func knownTarget(name string) bool {
	if isExtra(name) {
		return true
	}
	_, ok := catalog.FieldByName(name)
	return ok
}

func hasDim(ds []units.Dim, d units.Dim) bool {
	for _, x := range ds {
		if x == d {
			return true
		}
	}
	return false
}

func validKind(k catalog.Kind) bool {
	for _, x := range catalog.Kinds {
		if x == k {
			return true
		}
	}
	return false
}

// normType checks a type name for kind (any kind when k is "").
func normType(k catalog.Kind, t string) (string, bool) {
	t = strings.TrimSpace(t)
	for _, kk := range catalog.Kinds {
		if k != "" && kk != k {
			continue
		}
		for _, x := range catalog.Types[kk] {
			if strings.EqualFold(x, t) {
				return x, true
			}
		}
	}
	return "", false
}

func kindOrAll(k catalog.Kind) string {
	if k == "" {
		return "any kind"
	}
	return string(k)
}

func typeList(k catalog.Kind) string {
	var out []string
	for _, kk := range catalog.Kinds {
		if k == "" || kk == k {
			out = append(out, catalog.Types[kk]...)
		}
	}
	return strings.Join(out, ", ")
}

// headerKey is how mapping keys and sheet headers are compared.
func headerKey(h string) string { return strings.ToLower(cleanSpaces(h)) }

// letterIndex reads a column letter ("A" is 0, "AA" is 26).
func letterIndex(s string) (int, bool) {
	if s == "" || len(s) > 3 {
		return 0, false
	}
	n := 0
	for _, r := range s {
		if r < 'A' || r > 'Z' {
			return 0, false
		}
		n = n*26 + int(r-'A'+1)
	}
	return n - 1, true
}

// columnLetter is the spreadsheet letter of a 0-based column index.
func columnLetter(i int) string {
	s := ""
	for i++; i > 0; i = (i - 1) / 26 {
		s = string(rune('A'+(i-1)%26)) + s
	}
	return s
}

// recognizer returns the header recognizer of a mapping (nil m: the
// synonym table alone).
func (m *Mapping) recognizer() recognizer {
	cache := map[string]Column{} // cells repeat down the rows scanned for the header
	return func(h string, i int) Column {
		if m != nil {
			key := headerKey(h)
			if m.HasRow && m.HeaderRow == 0 {
				key = columnLetter(i)
			}
			if m.ignore[key] {
				return Column{Header: h, mapped: true}
			}
			if c, ok := m.columns[key]; ok {
				c.Header = h
				return c
			}
		}
		if c, ok := cache[h]; ok {
			return c
		}
		c := RecognizeHeader(h)
		if len(cache) < 10000 {
			cache[h] = c
		}
		return c
	}
}

var tableLineRE = regexp.MustCompile(`^\s*\[\s*([^\]]+?)\s*\]\s*(#.*)?$`)

// keyLine finds the line of a key in a TOML file, for messages: toml's
// metadata does not expose key positions.
func keyLine(data []byte, key toml.Key) int {
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 0, 64*1024), 1<<20)
	table, line, found := "", 0, 0
	want := key
	if len(want) > 2 {
		want = want[:2] // a key inside an inline table: the line of its entry
	}
	for sc.Scan() {
		line++
		t := sc.Text()
		if m := tableLineRE.FindStringSubmatch(t); m != nil {
			table = unquote(m[1])
			if len(want) == 1 && table == want[0] {
				return line
			}
			continue
		}
		eq := strings.Index(t, "=")
		if eq < 0 {
			continue
		}
		k := unquote(strings.TrimSpace(t[:eq]))
		switch {
		case len(want) == 1 && table == "" && k == want[0]:
			return line
		case len(want) == 2 && table == want[0] && k == want[1]:
			return line
		case len(want) == 2 && table == "" && k == want[0]+"."+want[1]:
			return line
		}
		if found == 0 && len(want) == 2 && table == "" && k == want[0] {
			found = line // columns = { ... } written inline
		}
	}
	if found > 0 {
		return found
	}
	return 1
}

func unquote(s string) string {
	s = strings.TrimSpace(s)
	if len(s) >= 2 && (s[0] == '"' || s[0] == '\'') && s[len(s)-1] == s[0] {
		return s[1 : len(s)-1]
	}
	return s
}

// keyName writes a TOML key for messages: columns."Strom".unit.
func keyName(k toml.Key) string {
	parts := make([]string, len(k))
	for i, p := range k {
		if regexp.MustCompile(`^[A-Za-z0-9_-]+$`).MatchString(p) {
			parts[i] = p
		} else {
			parts[i] = strconv.Quote(p)
		}
	}
	return strings.Join(parts, ".")
}
