package presets

import (
	"embed"
	"fmt"
	"path"
	"strings"
)

//go:embed protocols/*.yaml
var protocolFS embed.FS

// ProtocolNames returns the names of the built-in protocols, sorted.
func ProtocolNames() []string {
	entries, err := protocolFS.ReadDir("protocols")
	if err != nil {
		panic(err) // the embedded directory is part of the binary
	}
	names := make([]string, 0, len(entries))
	for _, e := range entries {
		names = append(names, strings.TrimSuffix(e.Name(), ".yaml"))
	}
	return names // ReadDir sorts by file name
}

// GetProtocol returns a built-in protocol by name.
func GetProtocol(name string) (*Protocol, error) {
	data, err := ProtocolSource(name)
	if err != nil {
		return nil, err
	}
	return ParseProtocol(data, "protocol "+name)
}

// ProtocolSource returns the YAML text of a built-in protocol, comments
// included, as a starting point for a protocol file of one's own.
func ProtocolSource(name string) ([]byte, error) {
	data, err := protocolFS.ReadFile(path.Join("protocols", name+".yaml"))
	if err != nil || name == "" || strings.ContainsAny(name, "/\\.") {
		return nil, fmt.Errorf("unknown protocol %q; built-in protocols: %s", name, strings.Join(ProtocolNames(), ", "))
	}
	return data, nil
}
