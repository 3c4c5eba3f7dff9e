module fieldtab

go 1.26.0

require (
	github.com/chromedp/cdproto v0.159.0
	github.com/chromedp/chromedp v0.23.0
	github.com/digitorus/pdf v0.1.2
	github.com/digitorus/pdfsign v0.0.0-20250819064552-5f74f69dda1d
	github.com/digitorus/pkcs7 v0.0.0-20230818184609-3a137a874352
	github.com/gorilla/mux v1.8.1
	github.com/jung-kurt/gofpdf v1.16.2
	github.com/mattn/go-sqlite3 v1.14.53
	github.com/skip2/go-qrcode v0.0.0-20200617195104-da1b6568686e
	golang.org/x/image v0.48.0
	software.sslmate.com/src/go-pkcs12 v0.7.4
)

require (
	github.com/digitorus/timestamp v0.0.0-20231217203849-220c5c2851b7 // indirect
	github.com/go-json-experiment/json v0.0.0-20260213210345-44df1a37e875 // indirect
	github.com/mattetti/filebuffer v1.0.1 // indirect
	golang.org/x/crypto v0.41.0 // indirect
	golang.org/x/text v0.44.0 // indirect
)
