module plica

go 1.26.8

require (
	github.com/BurntSushi/toml v1.6.0
	github.com/MaxHalford/eaopt v0.4.2
	github.com/stretchr/testify v1.12.1
	gonum.org/v1/gonum v0.17.0
)

require (
	go.yaml.in/yaml/v3 v3.0.5 // indirect
	golang.org/x/sync v0.16.0 // indirect
	golang.org/x/tools v0.36.0 // indirect
)
