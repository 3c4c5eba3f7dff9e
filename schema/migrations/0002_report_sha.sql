-- An issued revision is found by the SHA-256 of its PDF (fieldtab verify --db);
-- two revisions never share a PDF.
CREATE UNIQUE INDEX reports_pdf_sha256 ON reports (pdf_sha256);
