module fieldtab

go 1.26.0

require (
	github.com/chromedp/cdproto v0.159.0
	github.com/chromedp/chromedp v0.23.0
	github.com/gorilla/mux v1.8.1
	github.com/jung-kurt/gofpdf v1.16.2
	github.com/mattn/go-sqlite3 v1.14.53
	github.com/skip2/go-qrcode v0.0.0-20200617195104-da1b6568686e
	golang.org/x/image v0.48.0
)

require github.com/go-json-experiment/json v0.0.0-20260213210345-44df1a37e875 // indirect
