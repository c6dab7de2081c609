package password

import (
	"strings"
	"testing"
)

// fastParams keep the tests quick; the encoding and comparison logic are
// the same at any cost.
var fastParams = Params{MemoryKiB: 64, Time: 1, Threads: 1, SaltLen: 16, KeyLen: 32}

// Encoded hashes from the Argon2 reference implementation's test program,
// phc-winner-argon2 src/test.c (argon2id, version 19, password "password",
// salt "somesalt"). They pin our encoding and parameter parsing to an
// implementation other than golang.org/x/crypto.
func TestVerifyReferenceVectors(t *testing.T) {
	for _, tc := range []struct {
		name, encoded string
	}{
		{"m=256,t=2,p=1", "$argon2id$v=19$m=256,t=2,p=1$c29tZXNhbHQ$nf65EOgLrQMR/uIPnA4rEsF5h7TKyQwu9U1bMCHGi/4"},
		{"m=65536,t=2,p=1", "$argon2id$v=19$m=65536,t=2,p=1$c29tZXNhbHQ$CTFhFdXPJO1aFaMaO6Mm5c8y7cJHAph8ArZWb2GRPPc"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			ok, err := Verify("password", tc.encoded)
			if err != nil || !ok {
				t.Fatalf("Verify(password) = %v, %v; want true, nil", ok, err)
			}
			ok, err = Verify("passwore", tc.encoded)
			if err != nil || ok {
				t.Fatalf("Verify(passwore) = %v, %v; want false, nil", ok, err)
			}
		})
	}
}

func TestHashRoundTrip(t *testing.T) {
	h1, err := fastParams.Hash("correct horse battery")
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(h1, "$argon2id$v=19$m=64,t=1,p=1$") {
		t.Errorf("Hash = %q; want the PHC prefix with the given parameters", h1)
	}
	h2, err := fastParams.Hash("correct horse battery")
	if err != nil {
		t.Fatal(err)
	}
	if h1 == h2 {
		t.Error("two hashes of the same password are equal: salt is not random")
	}
	for _, tc := range []struct {
		pw   string
		want bool
	}{
		{"correct horse battery", true},
		{"correct horse batterY", false},
		{"", false},
	} {
		got, err := Verify(tc.pw, h1)
		if err != nil || got != tc.want {
			t.Errorf("Verify(%q) = %v, %v; want %v, nil", tc.pw, got, err, tc.want)
		}
	}
}

func TestDefaultParamsAreProductionStrength(t *testing.T) {
	want := Params{MemoryKiB: 64 * 1024, Time: 1, Threads: 2, SaltLen: 16, KeyLen: 32}
	if got := DefaultParams(); got != want {
		t.Errorf("DefaultParams() = %+v; want %+v", got, want)
	}
}

// A configuration that leaves the parameters unset must not hash cheaply.
func TestZeroParamsHashWithDefaults(t *testing.T) {
	h, err := Params{}.Hash("correct horse battery")
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(h, "$argon2id$v=19$m=65536,t=1,p=2$") {
		t.Errorf("zero Params hash = %q; want the production parameters", h)
	}
	if ok, err := Verify("correct horse battery", h); err != nil || !ok {
		t.Errorf("Verify = %v, %v; want true, nil", ok, err)
	}
}

func TestVerifyRejectsMalformed(t *testing.T) {
	for _, enc := range []string{
		"",
		"plaintext",
		"$2a$10$abcdefghijklmnopqrstuuABCDEFGHIJKLMNOPQRSTUVWXYZ012",                                 // bcrypt
		"$argon2i$v=19$m=256,t=2,p=1$c29tZXNhbHQ$nf65EOgLrQMR/uIPnA4rEsF5h7TKyQwu9U1bMCHGi/4",        // wrong variant
		"$argon2id$v=16$m=256,t=2,p=1$c29tZXNhbHQ$nf65EOgLrQMR/uIPnA4rEsF5h7TKyQwu9U1bMCHGi/4",       // old version
		"$argon2id$v=19$m=99999999,t=2,p=1$c29tZXNhbHQ$nf65EOgLrQMR/uIPnA4rEsF5h7TKyQwu9U1bMCHGi/4",  // memory bomb
		"$argon2id$v=19$m=256,t=0,p=1$c29tZXNhbHQ$nf65EOgLrQMR/uIPnA4rEsF5h7TKyQwu9U1bMCHGi/4",       // t=0
		"$argon2id$v=19$m=256,t=2,p=1$!!!$nf65EOgLrQMR/uIPnA4rEsF5h7TKyQwu9U1bMCHGi/4",               // bad salt
		"$argon2id$v=19$m=256,t=2,p=1$c29tZXNhbHQ$short",                                             // short hash
		"$argon2id$v=19$m=256,t=2,p=1$c29tZXNhbHQ$nf65EOgLrQMR/uIPnA4rEsF5h7TKyQwu9U1bMCHGi/4$extra", // extra field
	} {
		if ok, err := Verify("password", enc); err == nil || ok {
			t.Errorf("Verify(%q) = %v, %v; want false and an error", enc, ok, err)
		}
	}
}
