module pvcouple

go 1.26.8

require (
	go.yaml.in/yaml/v3 v3.0.6
	golang.org/x/term v0.48.0
	gonum.org/v1/gonum v0.17.0
)

require (
	github.com/google/renameio/v2 v2.0.2 // indirect
	golang.org/x/sys v0.50.0 // indirect
	golang.org/x/tools v0.30.0 // indirect
)
