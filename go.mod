module github.com/ejecta-dev/ejecta

go 1.26.8
