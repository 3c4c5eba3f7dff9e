package report

import (
	"bytes"
	"crypto"
	"crypto/sha256"
	"crypto/x509"
	"encoding/asn1"
	"encoding/hex"
	"errors"
	"fmt"
	"strings"
	"time"

	"github.com/digitorus/pdf"
	"github.com/digitorus/pdfsign/sign"
	"github.com/digitorus/pdfsign/verify"
	"github.com/digitorus/pkcs7"
)

// Signer is the key and certificate a report is digitally signed with, and
// what the signature dictionary says about the signing.
type Signer struct {
	Key         crypto.Signer
	Certificate *x509.Certificate
	// Chain is the issuing CA certificates above Certificate, nearest first;
	// empty for a self-issued certificate.
	Chain []*x509.Certificate
	// Name is the signer's name in the signature dictionary; "" takes the
	// certificate's common name.
	Name     string
	Reason   string
	Location string
	Contact  string
}

// Sign returns pdf with a PKCS#7 detached signature (adbe.pkcs7.detached,
// SHA-256) by s added as an incremental update: an invisible certification
// signature that allows no later change, whose byte range covers the whole
// output except the signature's /Contents.
//
// signedAt is the signing time the signature dictionary (/M) records; the
// PKCS#7 signingTime attribute is the clock's, which pdfsign does not let a
// caller set (the two agree when signedAt is now, as it is outside tests). The
// bytes before the signature are pdf's own, so the same report signs at the
// same offsets; the signature value itself differs from one run to the next
// (ECDSA draws a fresh nonce, and the PKCS#7 library stamps its signingTime
// attribute from the clock), so two signings of one report are not
// byte-identical, and need not be: Verify checks what matters.
//
// Errors are plain errors naming what is wrong (no signer key or
// certificate, a key not the certificate's, no signing time) or the PDF
// library's.
func Sign(pdfBytes []byte, s Signer, signedAt time.Time) ([]byte, error) {
	switch {
	case s.Key == nil:
		return nil, errors.New("report: sign: no signer key")
	case s.Certificate == nil:
		return nil, errors.New("report: sign: no signer certificate")
	case signedAt.IsZero():
		return nil, errors.New("report: sign: signed at is not set")
	}
	if !publicKeysEqual(s.Key.Public(), s.Certificate.PublicKey) {
		return nil, errors.New("report: sign: the signer key does not belong to the signer certificate")
	}
	name := s.Name
	if name == "" {
		name = s.Certificate.Subject.CommonName
	}
	rdr, err := pdf.NewReader(bytes.NewReader(pdfBytes), int64(len(pdfBytes)))
	if err != nil {
		return nil, fmt.Errorf("report: sign: reading the PDF: %w", err)
	}
	chain := append([]*x509.Certificate{s.Certificate}, s.Chain...)
	var out bytes.Buffer
	err = sign.Sign(bytes.NewReader(pdfBytes), &out, rdr, int64(len(pdfBytes)), sign.SignData{
		Signature: sign.SignDataSignature{
			Info: sign.SignDataSignatureInfo{
				Name:        name,
				Location:    s.Location,
				Reason:      s.Reason,
				ContactInfo: s.Contact,
				Date:        signedAt,
			},
			CertType:   sign.CertificationSignature,
			DocMDPPerm: sign.DoNotAllowAnyChangesPerms,
		},
		Signer:            s.Key,
		DigestAlgorithm:   crypto.SHA256,
		Certificate:       s.Certificate,
		CertificateChains: [][]*x509.Certificate{chain},
	})
	if err != nil {
		return nil, fmt.Errorf("report: sign: %w", err)
	}
	return out.Bytes(), nil
}

func publicKeysEqual(a, b crypto.PublicKey) bool {
	ea, ok := a.(interface{ Equal(crypto.PublicKey) bool })
	return ok && ea.Equal(b)
}

// VerifyResult is what Verify found in a signed report.
type VerifyResult struct {
	// Signer is the name in the signature dictionary; CommonName and
	// Issuer are the signing certificate's subject CN and issuer.
	Signer     string
	CommonName string
	Issuer     string
	Reason     string
	Location   string
	Contact    string
	SignedAt   time.Time // the signature dictionary's /M, as the signer stated it
	// CMSSigningTime is the PKCS#7 signingTime attribute, which the
	// signing library takes from the signing machine's clock (pdfsig shows
	// this one); zero when absent.
	CMSSigningTime time.Time
	Certificate    *x509.Certificate
	// SelfIssued is true when the certificate is its own issuer: the
	// signature is valid but says nothing about who vouches for the signer.
	SelfIssued bool
	// TrustedIssuer is true when the certificate chains to a root this
	// machine trusts.
	TrustedIssuer bool
	// ByteRange is the signed ranges: [0, a) and [b, b+c).
	ByteRange [4]int64
	// SignedDataSHA256 is the hex SHA-256 of the bytes the signature covers
	// (the whole file but /Contents); FileSHA256 that of the whole file, the
	// digest the store keeps for an issued revision.
	SignedDataSHA256 string
	FileSHA256       string
}

// oidSHA256 is id-sha256 (RFC 5754 §2.2).
var oidSHA256 = asn1.ObjectIdentifier{2, 16, 840, 1, 101, 3, 4, 2, 1}

// Verify checks a signed report: it holds exactly one signature, a PKCS#7
// detached one with SHA-256 whose signature is cryptographically valid for
// the bytes it covers, and those bytes are the whole file except the
// signature's /Contents hex string (nothing appended after signing, nothing
// left out). Trust in the certificate is reported (SelfIssued,
// TrustedIssuer), not required: a self-issued certificate is how a firm
// without a CA-issued one signs.
//
// Errors name what failed: "no signature", "more than one signature",
// "signature is not valid", "byte range", "digest algorithm", and so on.
func Verify(pdfBytes []byte) (VerifyResult, error) {
	var res VerifyResult
	size := int64(len(pdfBytes))
	sum := sha256.Sum256(pdfBytes)
	res.FileSHA256 = hex.EncodeToString(sum[:])

	sig, err := findSignature(pdfBytes)
	if err != nil {
		return res, err
	}
	// The byte range: two ranges, the first from 0, the second to the end,
	// with only the /Contents hex string between them.
	br := sig.Key("ByteRange")
	if br.Len() != 4 {
		return res, fmt.Errorf("verify: byte range has %d numbers, not 4", br.Len())
	}
	for i := range 4 {
		res.ByteRange[i] = br.Index(i).Int64()
	}
	a, b, c := res.ByteRange[1], res.ByteRange[2], res.ByteRange[3]
	switch {
	case res.ByteRange[0] != 0:
		return res, fmt.Errorf("verify: byte range starts at %d, not at the file's start", res.ByteRange[0])
	case a <= 0 || b <= a || c < 0 || b+c > size:
		return res, fmt.Errorf("verify: byte range %v does not fit the file of %d bytes", res.ByteRange, size)
	case b+c != size:
		return res, fmt.Errorf("verify: byte range does not cover the whole file: it ends at %d, the file at %d (%d bytes added after signing)", b+c, size, size-(b+c))
	}
	gap := pdfBytes[a:b]
	if len(gap) < 2 || gap[0] != '<' || gap[len(gap)-1] != '>' || strings.Trim(string(gap[1:len(gap)-1]), "0123456789abcdefABCDEF") != "" {
		return res, fmt.Errorf("verify: byte range leaves out bytes %d to %d, which are not only the signature's contents", a, b)
	}
	signed := make([]byte, 0, a+c)
	signed = append(signed, pdfBytes[:a]...)
	signed = append(signed, pdfBytes[b:b+c]...)
	ds := sha256.Sum256(signed)
	res.SignedDataSHA256 = hex.EncodeToString(ds[:])

	// The dictionary's /Contents is the hex string in the gap, decoded
	// (zero padding included, which the DER parser ignores).
	p7, err := pkcs7.Parse([]byte(sig.Key("Contents").RawString()))
	if err != nil {
		return res, fmt.Errorf("verify: signature contents are not PKCS#7: %v", err)
	}
	if len(p7.Signers) != 1 {
		return res, fmt.Errorf("verify: the PKCS#7 signature has %d signers, not 1", len(p7.Signers))
	}
	if alg := p7.Signers[0].DigestAlgorithm.Algorithm; !alg.Equal(oidSHA256) {
		return res, fmt.Errorf("verify: digest algorithm is %v, not SHA-256", alg)
	}
	if sf := sig.Key("SubFilter").Name(); sf != "adbe.pkcs7.detached" {
		return res, fmt.Errorf("verify: signature sub-filter is %q, not adbe.pkcs7.detached", sf)
	}

	// The cryptographic check, by pdfsign: the PKCS#7 message digest
	// against the byte range's bytes, and the signature over it.
	opts := verify.DefaultVerifyOptions()
	opts.RequiredEKUs = nil
	opts.AllowedEKUs = nil
	opts.TrustSignatureTime = true
	resp, err := verify.VerifyWithOptions(bytes.NewReader(pdfBytes), size, opts)
	if err != nil {
		return res, fmt.Errorf("verify: %v", err)
	}
	if len(resp.Signers) != 1 {
		return res, fmt.Errorf("verify: the PDF has %d readable signatures, not 1", len(resp.Signers))
	}
	sg := resp.Signers[0]
	if !sg.ValidSignature {
		msg := resp.Error
		if msg == "" {
			msg = "the signature does not match the signed bytes"
		}
		return res, fmt.Errorf("verify: signature is not valid: %s", msg)
	}
	res.Signer, res.Reason, res.Location, res.Contact = sg.Name, sg.Reason, sg.Location, sg.ContactInfo
	res.TrustedIssuer = sg.TrustedIssuer
	if sg.SignatureTime == nil {
		return res, errors.New("verify: the signature records no signing time")
	}
	res.SignedAt = *sg.SignatureTime
	cert := p7.GetOnlySigner()
	if cert == nil {
		return res, errors.New("verify: the signature carries no signing certificate")
	}
	res.Certificate = cert
	var st time.Time
	if p7.UnmarshalSignedAttribute(pkcs7.OIDAttributeSigningTime, &st) == nil {
		res.CMSSigningTime = st
	}
	res.CommonName = cert.Subject.CommonName
	res.Issuer = cert.Issuer.String()
	res.SelfIssued = bytes.Equal(cert.RawIssuer, cert.RawSubject) && cert.CheckSignature(cert.SignatureAlgorithm, cert.RawTBSCertificate, cert.Signature) == nil
	if res.Signer == "" {
		return res, errors.New("verify: the signature names no signer")
	}
	return res, nil
}

// findSignature returns the file's one signature dictionary.
func findSignature(pdfBytes []byte) (v pdf.Value, err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("verify: the PDF cannot be read: %v", r)
		}
	}()
	rdr, err := pdf.NewReader(bytes.NewReader(pdfBytes), int64(len(pdfBytes)))
	if err != nil {
		return v, fmt.Errorf("verify: the PDF cannot be read: %v", err)
	}
	var sigs []pdf.Value
	for _, x := range rdr.Xref() {
		o := rdr.Resolve(x.Ptr(), x.Ptr())
		if o.Key("Filter").Name() == "Adobe.PPKLite" {
			sigs = append(sigs, o)
		}
	}
	switch len(sigs) {
	case 0:
		return v, errors.New("verify: no signature: the PDF is not signed")
	case 1:
		return sigs[0], nil
	}
	return v, fmt.Errorf("verify: more than one signature (%d): a report carries one", len(sigs))
}
