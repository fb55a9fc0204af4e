package chrono

// ParseTimestamp reads a log's time value in one of the forms logs
// commonly write, without allocating (it runs on every row of a draw):
//
//   - RFC 3339: 2026-11-30T23:59:07Z, 2026-11-30T23:59:07.250+01:00
//     (a fraction of a second is ignored; the offset is applied);
//   - a date and time with a space and no offset, read as UTC:
//     2026-11-30 23:59:07 (and the same with a T, or a fraction);
//   - a date alone, read as its 00:00:00 UTC: 2026-11-30;
//   - Unix seconds, 9 to 11 digits (1973 to 5138), optionally with a
//     fraction: 1795996747, 1795996747.5. (Shorter numbers are refused,
//     so that a score or a count in the column is not read as a time in
//     1970.)
//
// Surrounding spaces are ignored. It returns the time as Unix seconds
// (UTC) and whether the value was in one of these forms with a valid
// calendar date and time of day.
func ParseTimestamp(b []byte) (int64, bool) {
	for len(b) > 0 && (b[0] == ' ' || b[0] == '\t') {
		b = b[1:]
	}
	for len(b) > 0 && (b[len(b)-1] == ' ' || b[len(b)-1] == '\t') {
		b = b[:len(b)-1]
	}
	if len(b) == 0 {
		return 0, false
	}
	if len(b) >= 10 && b[4] == '-' && b[7] == '-' {
		return parseDateTime(b)
	}
	return parseUnix(b)
}

// parseUnix reads 9 to 11 digits with an optional fraction: Unix
// seconds.
func parseUnix(b []byte) (int64, bool) {
	var v int64
	i := 0
	for ; i < len(b) && b[i] >= '0' && b[i] <= '9'; i++ {
		v = v*10 + int64(b[i]-'0')
		if i >= 11 {
			return 0, false
		}
	}
	if i < 9 {
		return 0, false
	}
	if i < len(b) {
		if b[i] != '.' || i+1 == len(b) || !digits(b[i+1:]) {
			return 0, false
		}
	}
	return v, true
}

func digits(b []byte) bool {
	for _, c := range b {
		if c < '0' || c > '9' {
			return false
		}
	}
	return len(b) > 0
}

// num reads exactly len(b) digits.
func num(b []byte) (int, bool) {
	v := 0
	for _, c := range b {
		if c < '0' || c > '9' {
			return 0, false
		}
		v = v*10 + int(c-'0')
	}
	return v, len(b) > 0
}

// parseDateTime reads YYYY-MM-DD, optionally followed by [T ]HH:MM:SS,
// a fraction and an offset (Z, ±HH:MM or ±HHMM).
func parseDateTime(b []byte) (int64, bool) {
	y, ok1 := num(b[0:4])
	m, ok2 := num(b[5:7])
	d, ok3 := num(b[8:10])
	if !ok1 || !ok2 || !ok3 || m < 1 || m > 12 || d < 1 || d > daysIn(y, m) {
		return 0, false
	}
	sec := daysFromCivil(y, m, d) * 86400
	rest := b[10:]
	if len(rest) == 0 {
		return sec, true
	}
	if rest[0] != 'T' && rest[0] != 't' && rest[0] != ' ' || len(rest) < 9 || rest[3] != ':' || rest[6] != ':' {
		return 0, false
	}
	hh, ok1 := num(rest[1:3])
	mm, ok2 := num(rest[4:6])
	ss, ok3 := num(rest[7:9])
	if !ok1 || !ok2 || !ok3 || hh > 23 || mm > 59 || ss > 60 {
		return 0, false
	}
	if ss == 60 {
		ss = 59 // a leap second counts as the second before it
	}
	sec += int64(hh*3600 + mm*60 + ss)
	rest = rest[9:]
	if len(rest) > 0 && (rest[0] == '.' || rest[0] == ',') {
		i := 1
		for i < len(rest) && rest[i] >= '0' && rest[i] <= '9' {
			i++
		}
		if i == 1 {
			return 0, false
		}
		rest = rest[i:]
	}
	switch {
	case len(rest) == 0:
		return sec, true
	case len(rest) == 1 && (rest[0] == 'Z' || rest[0] == 'z'):
		return sec, true
	case rest[0] == '+' || rest[0] == '-':
		off := rest[1:]
		var oh, om int
		var ok bool
		switch {
		case len(off) == 5 && off[2] == ':':
			oh, ok = num(off[0:2])
			if ok {
				om, ok = num(off[3:5])
			}
		case len(off) == 4:
			oh, ok = num(off[0:2])
			if ok {
				om, ok = num(off[2:4])
			}
		case len(off) == 2:
			oh, ok = num(off)
		}
		if !ok || oh > 23 || om > 59 {
			return 0, false
		}
		o := int64(oh*3600 + om*60)
		if rest[0] == '+' {
			return sec - o, true
		}
		return sec + o, true
	}
	return 0, false
}

// daysIn is the number of days of month m of year y (proleptic Gregorian).
func daysIn(y, m int) int {
	switch m {
	case 2:
		if y%4 == 0 && (y%100 != 0 || y%400 == 0) {
			return 29
		}
		return 28
	case 4, 6, 9, 11:
		return 30
	}
	return 31
}

// daysFromCivil is the number of days from 1970-01-01 to y-m-d in the
// proleptic Gregorian calendar (H. Hinnant's days_from_civil, "chrono-
// Compatible Low-Level Date Algorithms").
func daysFromCivil(y, m, d int) int64 {
	if m <= 2 {
		y--
	}
	era := y / 400
	if y < 0 && y%400 != 0 {
		era--
	}
	yoe := y - era*400
	mp := (m + 9) % 12
	doy := (153*mp+2)/5 + d - 1
	doe := yoe*365 + yoe/4 - yoe/100 + doy
	return int64(era)*146097 + int64(doe) - 719468
}
