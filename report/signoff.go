package report

import (
	"bytes"
	"fmt"
	"image"
	"image/draw"
	"image/png"

	"github.com/jung-kurt/gofpdf"

	"fieldtab/schema"
)

// ---- sign-off ----

func (d *doc) signoff() {
	d.heading(0, "Sign-off")
	s := d.in.Signoff
	d.certification(s)
	d.setY(d.y() + 6)
	const labelW = 52.0
	line := func(lbl, value string) {
		h := 9.0
		d.ensure(h)
		y := d.y()
		d.font(famSans, "B", sizeBody)
		d.pdf.SetXY(d.left(), y+2)
		d.pdf.CellFormat(labelW, 6, lbl, "", 0, "L", false, 0, "")
		d.font(famSans, "", sizeH2)
		d.pdf.SetXY(d.left()+labelW, y+2)
		d.pdf.CellFormat(110, 6, d.fit(value, 108), "", 0, "L", false, 0, "")
		d.pdf.SetDrawColor(120, 120, 120)
		d.pdf.SetLineWidth(0.2)
		d.pdf.Line(d.left()+labelW, y+8, d.left()+labelW+110, y+8)
		d.setY(y + h)
	}
	if s == nil {
		line("Name", "")
		line("Certification or license no.", "")
		line("Firm", "")
		line("Date", "")
	} else {
		line("Name", s.Name)
		line("Certification or license no.", orDash(s.Certification))
		line("Firm", orDash(s.Organisation))
		line("Date", d.dateTime(s.SignedAt))
	}
	d.setY(d.y() + 6)
	d.ensure(40)
	y := d.y()
	d.font(famSans, "B", sizeBody)
	d.pdf.SetXY(d.left(), y+24)
	d.pdf.CellFormat(labelW, 6, "Signature", "", 0, "L", false, 0, "")
	boxW, boxH := 110.0, 30.0
	if s != nil && s.SignaturePNG != nil {
		d.signatureImage(s.SignaturePNG, d.left()+labelW, y, boxW, boxH)
	}
	d.pdf.SetDrawColor(60, 60, 60)
	d.pdf.SetLineWidth(0.3)
	d.pdf.Line(d.left()+labelW, y+boxH, d.left()+labelW+boxW, y+boxH)
	d.setY(y + boxH + 4)
	if d.preliminary() {
		d.para("Not signed: a preview. An issued revision carries the signer's drawn signature here and a digital signature on the file.",
			"I", sizeSmall)
	}
}

// signatureImage places the drawn signature inside the box, keeping its
// aspect ratio, sitting on the signature line. The PNG (vetted by check) is
// redrawn as 8-bit RGBA first: gofpdf reads neither interlaced nor 16-bit
// PNGs, and a canvas may give either.
func (d *doc) signatureImage(b []byte, x, y, w, h float64) {
	src, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		d.pdf.SetError(schema.Errorf(schema.Invalid, "signoff.signature_png", "cannot be read: %v", err))
		return
	}
	img := image.NewNRGBA(src.Bounds())
	draw.Draw(img, img.Bounds(), src, src.Bounds().Min, draw.Src)
	var plain bytes.Buffer
	if err := png.Encode(&plain, img); err != nil {
		d.pdf.SetError(fmt.Errorf("signature: %w", err))
		return
	}
	opt := gofpdf.ImageOptions{ImageType: "PNG"}
	d.pdf.RegisterImageOptionsReader("signature", opt, &plain)
	iw, ih := w, w*float64(img.Bounds().Dy())/float64(img.Bounds().Dx())
	if ih > h {
		iw, ih = h*float64(img.Bounds().Dx())/float64(img.Bounds().Dy()), h
	}
	d.pdf.ImageOptions("signature", x, y+h-ih, iw, ih, false, opt, 0, "")
}
