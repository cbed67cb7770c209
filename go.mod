module worth

go 1.26.8

require (
	github.com/Knetic/govaluate v3.0.0+incompatible // indirect
	github.com/go-pdf/fpdf v0.9.0 // indirect
	github.com/yuin/goldmark v1.8.7 // indirect
	go.yaml.in/yaml/v3 v3.0.6 // indirect
	golang.org/x/image v0.48.0 // indirect
	golang.org/x/net v0.62.0 // indirect
)
