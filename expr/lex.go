package expr

import (
	"fmt"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

type tokKind uint8

const (
	tEOF tokKind = iota
	tNum
	tStr
	tIdent
	tOp
	tLParen
	tRParen
	tComma
)

// token is one lexeme; pos and end are byte offsets in the original source.
type token struct {
	kind     tokKind
	pos, end int
	num      float64
	text     string // identifier name, string value, or operator as govaluate spells it
	grouped  bool   // a number written with thousands separators
}

var currencies = []string{"$", "€", "£", "¥"}

func currencyLen(s string, i int) int {
	for _, c := range currencies {
		if strings.HasPrefix(s[i:], c) {
			return len(c)
		}
	}
	return 0
}

func isDigit(c byte) bool { return c >= '0' && c <= '9' }

func isIdentStart(r rune) bool { return r == '_' || unicode.IsLetter(r) }

func isIdentChar(r rune) bool { return r == '_' || unicode.IsLetter(r) || unicode.IsDigit(r) }

// numberStart reports whether a number's digits start at s[i].
func numberStart(s string, i int) bool {
	return i < len(s) && (isDigit(s[i]) || s[i] == '.' && i+1 < len(s) && isDigit(s[i+1]))
}

// identEnd returns the end of the identifier starting at s[i].
func identEnd(s string, i int) int {
	for i < len(s) {
		r, size := utf8.DecodeRuneInString(s[i:])
		if !isIdentChar(r) {
			break
		}
		i += size
	}
	return i
}

// scanNumber reads the number whose digits start at s[start] (numberStart is
// true there). It returns the value, the end offset and whether thousands
// separators were used.
func scanNumber(s string, start int) (v float64, end int, grouped bool, err *Error) {
	var mant strings.Builder
	i := start
	for {
		j := i
		for j < len(s) && isDigit(s[j]) {
			j++
		}
		mant.WriteString(s[i:j])
		i = j
		// a thousands separator: digits before, exactly three digits after
		if i > start && i+4 <= len(s) && s[i] == ',' &&
			isDigit(s[i+1]) && isDigit(s[i+2]) && isDigit(s[i+3]) &&
			(i+4 == len(s) || !isDigit(s[i+4])) {
			grouped = true
			i++
			continue
		}
		break
	}
	if i < len(s) && s[i] == '.' && i+1 < len(s) && isDigit(s[i+1]) {
		j := i + 1
		for j < len(s) && isDigit(s[j]) {
			j++
		}
		mant.WriteString(s[i:j])
		i = j
	}
	exp := 0
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		if j < len(s) && isDigit(s[j]) {
			k := j
			for k < len(s) && isDigit(s[k]) {
				k++
			}
			n, aerr := strconv.Atoi(s[i+1 : k])
			if aerr != nil || n > 100000 || n < -100000 {
				return 0, 0, false, &Error{Col: start, Msg: fmt.Sprintf("number %q is out of range", s[start:k])}
			}
			exp = n
			i = k
		}
	}
	if i < len(s) {
		switch {
		case (s[i] == 'k' || s[i] == 'M') && !identCharAt(s, i+1):
			exp += map[byte]int{'k': 3, 'M': 6}[s[i]]
			i++
		case s[i] == '%':
			exp -= 2
			i++
		}
	}
	if i < len(s) && s[i] == '.' {
		j := i
		for j < len(s) && (isDigit(s[j]) || s[j] == '.') {
			j++
		}
		return 0, 0, false, &Error{Col: start, Msg: fmt.Sprintf("malformed number %q", s[start:j])}
	}
	if identCharAt(s, i) {
		return 0, 0, false, &Error{Col: i, Msg: fmt.Sprintf(
			"unexpected %q right after the number %q; put an operator between them (only k, M or %% may follow a number: 480k, 1.2M, 7%%)",
			s[i:identEnd(s, i)], s[start:i])}
	}
	v, perr := strconv.ParseFloat(mant.String()+"e"+strconv.Itoa(exp), 64)
	if perr != nil {
		return 0, 0, false, &Error{Col: start, Msg: fmt.Sprintf("number %q is out of range", s[start:i])}
	}
	return v, i, grouped, nil
}

func identCharAt(s string, i int) bool {
	if i >= len(s) {
		return false
	}
	r, _ := utf8.DecodeRuneInString(s[i:])
	return isIdentChar(r)
}

// ParseNumber reports whether src, after trimming spaces, is exactly one
// plain number form, and returns its value: "1,250,000", "$480k", "7%",
// "1.2M", "0.11", "-3", "-$1,094,310". It accepts what a number literal in
// an expression accepts, plus a leading sign.
func ParseNumber(src string) (float64, bool) {
	s := strings.TrimSpace(src)
	sign := 1.0
	i := 0
	if i < len(s) && (s[i] == '-' || s[i] == '+') {
		if s[i] == '-' {
			sign = -1
		}
		i++
	}
	i += currencyLen(s, i)
	if !numberStart(s, i) {
		return 0, false
	}
	v, end, _, err := scanNumber(s, i)
	if err != nil || end != len(s) {
		return 0, false
	}
	return sign * v, true
}

// twoCharOps are the two-character operators; "^" is rewritten to "**".
var twoCharOps = []string{"**", "==", "!=", "<=", ">=", "&&", "||"}

const oneCharOps = "+-*/%^<>!?:"

// charHints explains characters that are not part of the language.
var charHints = map[rune]string{
	'=':  `; use == to compare`,
	'&':  `; use && for "and"`,
	'|':  `; use || for "or"`,
	'×':  `; use * to multiply`,
	'·':  `; use * to multiply`,
	'÷':  `; use / to divide`,
	'−':  `; use - for minus`,
	'–':  `; use - for minus`,
	'—':  `; use - for minus`,
	'[':  `; group with ( and )`,
	']':  `; group with ( and )`,
	'{':  `; group with ( and )`,
	'}':  `; group with ( and )`,
	'\\': ` (a backslash has no meaning in an expression)`,
	'#':  ` (a comment cannot start inside an expression)`,
}

// lex splits s into tokens, ending with a tEOF token at len(s).
func lex(s string) ([]token, *Error) {
	var toks []token
	i := 0
	for i < len(s) {
		c := s[i]
		r, size := utf8.DecodeRuneInString(s[i:])
		if r == utf8.RuneError && size == 1 {
			return nil, &Error{Col: i, Msg: fmt.Sprintf("invalid byte 0x%02x (the text is not UTF-8)", c)}
		}
		if unicode.IsSpace(r) {
			i += size
			continue
		}
		start := i
		switch {
		case numberStart(s, i) || currencyLen(s, i) > 0:
			if n := currencyLen(s, i); n > 0 {
				if !numberStart(s, i+n) {
					return nil, &Error{Col: i, Msg: fmt.Sprintf("expected a number after %q", s[i:i+n])}
				}
				i += n
			}
			v, end, grouped, err := scanNumber(s, i)
			if err != nil {
				return nil, err
			}
			toks = append(toks, token{kind: tNum, pos: start, end: end, num: v, grouped: grouped})
			i = end
		case isIdentStart(r):
			i = identEnd(s, i)
			toks = append(toks, token{kind: tIdent, pos: start, end: i, text: s[start:i]})
		case c == '"' || c == '\'':
			var b strings.Builder
			i++
			for {
				if i >= len(s) {
					return nil, &Error{Col: start, Msg: fmt.Sprintf("unterminated string: missing the closing %c", c)}
				}
				if s[i] == c {
					i++
					break
				}
				if s[i] == '\\' {
					i++
					if i >= len(s) {
						continue
					}
				}
				_, n := utf8.DecodeRuneInString(s[i:])
				b.WriteString(s[i : i+n])
				i += n
			}
			toks = append(toks, token{kind: tStr, pos: start, end: i, text: b.String()})
		case c == '(':
			i++
			toks = append(toks, token{kind: tLParen, pos: start, end: i})
		case c == ')':
			i++
			toks = append(toks, token{kind: tRParen, pos: start, end: i})
		case c == ',':
			i++
			toks = append(toks, token{kind: tComma, pos: start, end: i})
		default:
			op := ""
			for _, o := range twoCharOps {
				if strings.HasPrefix(s[i:], o) {
					op = o
					break
				}
			}
			if op == "" && strings.IndexByte(oneCharOps, c) >= 0 {
				op = s[i : i+1]
			}
			if op == "" {
				what := fmt.Sprintf("character %q", r)
				if r == '\\' {
					what = "backslash"
				}
				return nil, &Error{Col: i, Msg: "unexpected " + what + charHints[r]}
			}
			i += len(op)
			if op == "^" {
				op = "**"
			}
			toks = append(toks, token{kind: tOp, pos: start, end: i, text: op})
		}
	}
	toks = append(toks, token{kind: tEOF, pos: len(s), end: len(s)})
	return toks, nil
}
