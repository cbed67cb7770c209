module worth

go 1.26.8

require (
	github.com/Knetic/govaluate v3.0.0+incompatible
	github.com/yuin/goldmark v1.8.7
	go.yaml.in/yaml/v3 v3.0.6
	golang.org/x/net v0.62.0
)
