module fieldtab

go 1.26
