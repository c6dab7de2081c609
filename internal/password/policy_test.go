package password

import (
	"encoding/base64"
	"fmt"
	"strings"
	"testing"
	"unicode/utf8"

	"golang.org/x/crypto/argon2"

	"wardload/internal/wardload"
)

// TestCheckLength pins the lengths of NIST SP 800-63B-4 section 3.1.1.2:
// at least 15 characters for a password used alone, counted as Unicode
// code points after NFKC normalisation; wardload allows up to 256.
func TestCheckLength(t *testing.T) {
	strong14 := "x7#Kq9!mZ2@vL4" // no pattern zxcvbn knows: only the length decides
	for _, tc := range []struct {
		name string
		pw   string
		ok   bool
		msg  string // part of the refusal
	}{
		{"14 characters", strong14, false, "at least 15 characters"},
		{"15 characters", strong14 + "p", true, ""},
		{"14 characters, 28 bytes", "Жз7Ыю9Щф2Эя4Ць", false, "at least 15 characters"},
		{"15 characters, 30 bytes", "Жз7Ыю9Щф2Эя4Цьб", true, ""},
		// U+FB01 LATIN SMALL LIGATURE FI is one character typed and two
		// ("fi") after NFKC, so the policy counts 15.
		{"14 typed, 15 after NFKC", strong14[:13] + "\ufb01", true, ""},
		{"256 characters", strings.Repeat("x7#Kq9!mZ2@vL4pw", 16), true, ""},
		{"257 characters", strings.Repeat("x7#Kq9!mZ2@vL4pw", 16) + "e", false, "at most 256 characters"},
		{"1,000 characters", strings.Repeat("Zq8!", 250), false, "at most 256 characters"},
		{"empty", "", false, "at least 15 characters"},
		{"invalid UTF-8", strong14 + "p\xff", false, "valid UTF-8"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Check(tc.pw, "a.murphy")
			if (err == nil) != tc.ok {
				t.Fatalf("Check(%q) = %v; want ok=%v", tc.pw, err, tc.ok)
			}
			if err != nil && (wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != "password" ||
				!strings.Contains(wardload.ErrorMessage(err), tc.msg)) {
				t.Errorf("error = %v; want EINVALID on field password saying %q", err, tc.msg)
			}
		})
	}
	if n := utf8.RuneCountInString("Жз7Ыю9Щф2Эя4Ць"); n != 14 {
		t.Fatalf("fixture has %d characters, want 14", n)
	}
}

// TestCheckRefusesGuessable: the passwords below are refused although each
// is at least 15 characters. "password" (rank 2), "iloveyou" (rank 52),
// "qwertyuiop" (rank 23) and "1q2w3e4r5t6y" (rank 1938) are entries of
// the zxcvbn 4.4.2 common-password list (data/passwords.txt of
// github.com/trustelem/zxcvbn v1.0.1, from the Xato 10-million corpus);
// the others are repeats, sequences and the user name, as SP 800-63B-4
// section 3.1.1.2 names "repetitive or sequential characters" and
// "context-specific words, such as ... the username" for its blocklist.
// The first three are the examples (ten spaces, "aaaaaaaaaa",
// "password12") stretched to 15 characters.
func TestCheckRefusesGuessable(t *testing.T) {
	for _, pw := range []string{
		"               ", // fifteen spaces
		"aaaaaaaaaaaaaaa",
		"password1234567",
		"passwordpassword",
		"iloveyou12345678",
		"qwertyuiopasdfgh",
		"1q2w3e4r5t6y7u8i",
		"abcdefghijklmnop",
		"123456789012345",
		"a.murphya.murphy",   // the name twice
		"A.Murphy a.murphy",  // in another case, with a space
		"a.murphy1234567890", // name and a sequence
		"Ｐａｓｓｗｏｒｄ1234567",    // full-width "Password" is the common password after NFKC
	} {
		if n, err := Check(pw, "a.murphy"); err == nil {
			t.Errorf("Check(%q) accepted %q; want it refused", pw, n)
		} else if wardload.ErrorField(err) != "password" || strings.Contains(wardload.ErrorMessage(err), pw) {
			t.Errorf("Check(%q): %v; want a password field error that does not repeat it", pw, err)
		}
	}
}

// TestCheckAcceptsPassphrases: unrelated words and random strings pass,
// with no composition rule (no digit, capital or symbol needed).
func TestCheckAcceptsPassphrases(t *testing.T) {
	for _, pw := range []string{
		"correct horse battery staple",
		"blue kettle marsh lantern",
		"sunflower garden tuesday",
		"QH4MZ7RW2KXN5PTV3BJ6YC8D", // random base32, as the demo's
		"Жз7Ыю9Щф2Эя4Цьб",
	} {
		if _, err := Check(pw, "a.murphy"); err != nil {
			t.Errorf("Check(%q) = %v; want accepted", pw, err)
		}
	}
}

// TestCheckDeterministic: the same input always gets the same answer.
func TestCheckDeterministic(t *testing.T) {
	for _, pw := range []string{"seventeen lilies", "password1234567", "blue kettle marsh lantern"} {
		_, e1 := Check(pw, "a.murphy")
		_, e2 := Check(pw, "a.murphy")
		if (e1 == nil) != (e2 == nil) || wardload.ErrorMessage(e1) != wardload.ErrorMessage(e2) {
			t.Errorf("Check(%q) gave %v then %v", pw, e1, e2)
		}
	}
}

// TestNormalizeNFKC checks UAX #15 normalisation form KC on characters
// whose decomposition the Unicode Character Database gives: U+00E9 is
// U+0065 U+0301 canonically, U+FF21..U+FF3A are compatibility forms of
// A..Z, U+FB01 of "fi".
func TestNormalizeNFKC(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{"cafe\u0301", "caf\u00e9"},
		{"caf\u00e9", "caf\u00e9"},
		{"\uff2b\uff45\uff54\uff54\uff4c\uff45", "Kettle"},
		{"\ufb01eld", "field"},
	} {
		if got := Normalize(tc.in); got != tc.want {
			t.Errorf("Normalize(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}

// TestVerifyNormalised: a password set typed one way signs in typed
// another way that is the same after NFKC.
func TestVerifyNormalised(t *testing.T) {
	composed := "blue k\u00e9ttle marsh lantern"
	decomposed := "blue ke\u0301ttle marsh lantern"
	fullWidth := "\uff42\uff4c\uff55\uff45 k\u00e9ttle marsh lantern" // "ｂｌｕｅ"
	h, err := fastParams.HashNew(fullWidth, "a.murphy", "")
	if err != nil {
		t.Fatal(err)
	}
	for _, pw := range []string{composed, decomposed, fullWidth} {
		if ok, err := Verify(pw, h); err != nil || !ok {
			t.Errorf("Verify(%q) = %v, %v; want true", pw, ok, err)
		}
	}
	if ok, _ := Verify("blue kettle marsh lantern", h); ok {
		t.Error("Verify without the accent matched; normalisation must not strip accents")
	}
}

// TestVerifyLegacyHash: a hash made before normalisation, of the password
// as typed (here with a decomposed accent), still verifies.
func TestVerifyLegacyHash(t *testing.T) {
	typed := "ke\u0301ttle"
	salt := []byte("somesaltsomesalt")
	key := argon2.IDKey([]byte(typed), salt, 1, 64, 1, 32)
	b64 := base64.RawStdEncoding
	h := fmt.Sprintf("$argon2id$v=19$m=64,t=1,p=1$%s$%s", b64.EncodeToString(salt), b64.EncodeToString(key))
	if ok, err := Verify(typed, h); err != nil || !ok {
		t.Fatalf("Verify(legacy) = %v, %v; want true", ok, err)
	}
	if ok, _ := Verify("kettle", h); ok {
		t.Fatal("Verify(kettle) matched a different password")
	}
}

// TestHashNewRefusesCurrent: the same password again, however typed, is
// refused; another one is hashed.
func TestHashNewRefusesCurrent(t *testing.T) {
	h, err := fastParams.HashNew("blue k\u00e9ttle marsh lantern", "a.murphy", "")
	if err != nil {
		t.Fatal(err)
	}
	for _, again := range []string{"blue k\u00e9ttle marsh lantern", "blue ke\u0301ttle marsh lantern"} {
		if _, err := fastParams.HashNew(again, "a.murphy", h); wardload.ErrorField(err) != "password" {
			t.Errorf("HashNew(same %q) = %v; want refused", again, err)
		}
	}
	if _, err := fastParams.HashNew("sunflower garden tuesday", "a.murphy", h); err != nil {
		t.Errorf("HashNew(another) = %v", err)
	}
}
