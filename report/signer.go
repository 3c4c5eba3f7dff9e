package report

import (
	"crypto"
	"crypto/ecdsa"
	"crypto/elliptic"
	"crypto/rand"
	"crypto/sha256"
	"crypto/x509"
	"crypto/x509/pkix"
	"encoding/asn1"
	"encoding/hex"
	"encoding/pem"
	"errors"
	"fmt"
	"io/fs"
	"math/big"
	"net/mail"
	"os"
	"path/filepath"
	"strings"
	"time"

	"software.sslmate.com/src/go-pkcs12"
)

// The signer's files in a signer directory, PEM, mode 0600.
const (
	SignerKeyFile  = "signer-key.pem"
	SignerCertFile = "signer-cert.pem"
)

// SelfIssuedValidity is how long a certificate from NewSelfIssued is valid.
const SelfIssuedValidity = 5 * 365 * 24 * time.Hour

// oidEmailAddress is PKCS #9 emailAddress (RFC 2985 §5.2.1), the subject
// attribute PDF readers show beside the name.
var oidEmailAddress = asn1.ObjectIdentifier{1, 2, 840, 113549, 1, 9, 1}

// NewSelfIssued makes an ECDSA P-256 key and a self-issued X.509 certificate
// for it: subject CN=name, O=org, emailAddress=email (and email as its
// subject alternative name), key usage digitalSignature and
// contentCommitment (non-repudiation), valid from now (less a minute, for
// clock skew) for SelfIssuedValidity.
func NewSelfIssued(name, org, email string, now time.Time) (Signer, error) {
	name, org, email = strings.TrimSpace(name), strings.TrimSpace(org), strings.TrimSpace(email)
	switch {
	case name == "":
		return Signer{}, errors.New("name is required")
	case org == "":
		return Signer{}, errors.New("org is required")
	case email == "":
		return Signer{}, errors.New("email is required")
	}
	if a, err := mail.ParseAddress(email); err != nil || a.Address != email {
		return Signer{}, fmt.Errorf("email %q is not an e-mail address", email)
	}
	key, err := ecdsa.GenerateKey(elliptic.P256(), rand.Reader)
	if err != nil {
		return Signer{}, err
	}
	serial, err := rand.Int(rand.Reader, new(big.Int).Lsh(big.NewInt(1), 127))
	if err != nil {
		return Signer{}, err
	}
	subject := pkix.Name{
		CommonName:   name,
		Organization: []string{org},
		ExtraNames:   []pkix.AttributeTypeAndValue{{Type: oidEmailAddress, Value: email}},
	}
	tmpl := &x509.Certificate{
		SerialNumber:          serial,
		Subject:               subject,
		Issuer:                subject,
		NotBefore:             now.Add(-time.Minute).UTC(),
		NotAfter:              now.Add(SelfIssuedValidity).UTC(),
		KeyUsage:              x509.KeyUsageDigitalSignature | x509.KeyUsageContentCommitment,
		EmailAddresses:        []string{email},
		BasicConstraintsValid: true,
	}
	der, err := x509.CreateCertificate(rand.Reader, tmpl, tmpl, key.Public(), key)
	if err != nil {
		return Signer{}, err
	}
	cert, err := x509.ParseCertificate(der)
	if err != nil {
		return Signer{}, err
	}
	return Signer{Key: key, Certificate: cert, Name: name, Contact: email}, nil
}

// SignerFromPKCS12 reads a key, its certificate and the CA chain from a
// PKCS #12 (.p12/.pfx) file, as a CA issues them.
func SignerFromPKCS12(data []byte, password string) (Signer, error) {
	key, cert, chain, err := pkcs12.DecodeChain(data, password)
	if err != nil {
		return Signer{}, fmt.Errorf("PKCS #12 file: %w", err)
	}
	k, ok := key.(crypto.Signer)
	if !ok {
		return Signer{}, fmt.Errorf("PKCS #12 file: its %T key cannot sign", key)
	}
	s := Signer{Key: k, Certificate: cert, Chain: chain, Name: cert.Subject.CommonName}
	if len(cert.EmailAddresses) > 0 {
		s.Contact = cert.EmailAddresses[0]
	}
	if err := checkSigner(s); err != nil {
		return Signer{}, fmt.Errorf("PKCS #12 file: %w", err)
	}
	return s, nil
}

func checkSigner(s Signer) error {
	if !publicKeysEqual(s.Key.Public(), s.Certificate.PublicKey) {
		return errors.New("the key does not belong to the certificate")
	}
	if ku := s.Certificate.KeyUsage; ku != 0 && ku&(x509.KeyUsageDigitalSignature|x509.KeyUsageContentCommitment) == 0 {
		return errors.New("the certificate's key usage allows neither digital signature nor content commitment")
	}
	return nil
}

// WriteSignerDir writes s to dir as SignerKeyFile (PKCS #8) and
// SignerCertFile (the certificate, then its chain), both mode 0600, making
// dir (0700) if needed. It refuses to replace existing files unless force.
func WriteSignerDir(dir string, s Signer, force bool) error {
	if err := checkSigner(s); err != nil {
		return err
	}
	keyDER, err := x509.MarshalPKCS8PrivateKey(s.Key)
	if err != nil {
		return fmt.Errorf("signer key: %w", err)
	}
	keyPEM := pem.EncodeToMemory(&pem.Block{Type: "PRIVATE KEY", Bytes: keyDER})
	var certPEM []byte
	for _, c := range append([]*x509.Certificate{s.Certificate}, s.Chain...) {
		certPEM = append(certPEM, pem.EncodeToMemory(&pem.Block{Type: "CERTIFICATE", Bytes: c.Raw})...)
	}
	if err := os.MkdirAll(dir, 0o700); err != nil {
		return err
	}
	keyPath, certPath := filepath.Join(dir, SignerKeyFile), filepath.Join(dir, SignerCertFile)
	if !force {
		for _, p := range []string{keyPath, certPath} {
			if _, err := os.Lstat(p); err == nil {
				return fmt.Errorf("%s exists: a signer is already set up there (give --force to replace it; documents it signed stay valid)", p)
			} else if !errors.Is(err, fs.ErrNotExist) {
				return err
			}
		}
	}
	if err := writePrivate(keyPath, keyPEM); err != nil {
		return err
	}
	return writePrivate(certPath, certPEM)
}

// writePrivate writes data to path with mode 0600 through a temporary file
// and a rename, so a reader never sees half a key.
func writePrivate(path string, data []byte) error {
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	defer os.Remove(tmp)
	if err := f.Chmod(0o600); err != nil {
		f.Close()
		return err
	}
	if _, err := f.Write(data); err != nil {
		f.Close()
		return err
	}
	if err := f.Sync(); err != nil {
		f.Close()
		return err
	}
	if err := f.Close(); err != nil {
		return err
	}
	return os.Rename(tmp, path)
}

// LoadSignerDir reads the signer written by WriteSignerDir. Name and
// Contact come from the certificate (its CN and first e-mail address).
func LoadSignerDir(dir string) (Signer, error) {
	keyPEM, err := os.ReadFile(filepath.Join(dir, SignerKeyFile))
	if err != nil {
		return Signer{}, fmt.Errorf("signer key: %w (run `fieldtab signer init` or `fieldtab signer import`)", err)
	}
	certPEM, err := os.ReadFile(filepath.Join(dir, SignerCertFile))
	if err != nil {
		return Signer{}, fmt.Errorf("signer certificate: %w", err)
	}
	kb, _ := pem.Decode(keyPEM)
	if kb == nil || kb.Type != "PRIVATE KEY" {
		return Signer{}, fmt.Errorf("%s: not a PEM PRIVATE KEY", SignerKeyFile)
	}
	key, err := x509.ParsePKCS8PrivateKey(kb.Bytes)
	if err != nil {
		return Signer{}, fmt.Errorf("%s: %w", SignerKeyFile, err)
	}
	k, ok := key.(crypto.Signer)
	if !ok {
		return Signer{}, fmt.Errorf("%s: its %T key cannot sign", SignerKeyFile, key)
	}
	var certs []*x509.Certificate
	for rest := certPEM; ; {
		var b *pem.Block
		if b, rest = pem.Decode(rest); b == nil {
			break
		}
		if b.Type != "CERTIFICATE" {
			continue
		}
		c, err := x509.ParseCertificate(b.Bytes)
		if err != nil {
			return Signer{}, fmt.Errorf("%s: %w", SignerCertFile, err)
		}
		certs = append(certs, c)
	}
	if len(certs) == 0 {
		return Signer{}, fmt.Errorf("%s: no certificate", SignerCertFile)
	}
	s := Signer{Key: k, Certificate: certs[0], Chain: certs[1:], Name: certs[0].Subject.CommonName}
	if len(certs[0].EmailAddresses) > 0 {
		s.Contact = certs[0].EmailAddresses[0]
	}
	if err := checkSigner(s); err != nil {
		return Signer{}, fmt.Errorf("%s: %w", dir, err)
	}
	return s, nil
}

// Fingerprint is the hex SHA-256 of a certificate's DER, colon-separated as
// certificate viewers show it.
func Fingerprint(c *x509.Certificate) string {
	sum := sha256.Sum256(c.Raw)
	h := strings.ToUpper(hex.EncodeToString(sum[:]))
	var b strings.Builder
	for i := 0; i < len(h); i += 2 {
		if i > 0 {
			b.WriteByte(':')
		}
		b.WriteString(h[i : i+2])
	}
	return b.String()
}
