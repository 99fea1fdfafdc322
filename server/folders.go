package server

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path"
	"sort"
	"strconv"
	"strings"
	"unicode/utf8"

	"pvcouple/internal/safefile"
	"pvcouple/presets"
	"pvcouple/ui"
)

// Folder limits.
const (
	// maxDepth is how deep a listing looks into subfolders.
	maxDepth = 4
	// maxListed caps the files listed from one folder.
	maxListed = 1000
	// maxSaveName caps the length of a saved file's name.
	maxSaveName = 64
)

// extensions are the file name endings listed for each kind of file.
var extensions = map[ui.FileKind][]string{
	ui.ScenarioFiles:  {".yaml", ".yml"},
	ui.ProtocolFiles:  {".yaml", ".yml"},
	ui.RecordingFiles: {".csv", ".tsv", ".txt"},
}

// folders are one fellow's files: DATA/users/NAME, read and written, and
// DATA/shared, read only. Every access goes through an os.Root, which
// refuses names that leave the folder, whether by "..", an absolute path or
// a symbolic link; only regular files are listed or opened.
type folders struct {
	fellow string
	own    *os.Root
	shared *os.Root // nil when the lab has no shared folder
	// saved is told of every file saved (for the log).
	saved func(name string, size int, replaced bool)
}

var _ ui.Folders = (*folders)(nil)

// openFolders opens (creating it if need be) the folder of fellow under
// users, the root of DATA/users.
func openFolders(users, shared *os.Root, fellow string) (*folders, error) {
	if err := CheckName(fellow); err != nil {
		return nil, err
	}
	if err := users.Mkdir(fellow, 0o750); err != nil && !errors.Is(err, fs.ErrExist) {
		return nil, fmt.Errorf("folder of %s: %w", fellow, err)
	}
	own, err := users.OpenRoot(fellow)
	if err != nil {
		return nil, fmt.Errorf("folder of %s: %w", fellow, err)
	}
	return &folders{fellow: fellow, own: own, shared: shared}, nil
}

// Close releases the fellow's folder (the shared one belongs to the server).
func (f *folders) Close() error { return f.own.Close() }

// Own implements ui.Folders.
func (f *folders) Own() string { return f.fellow }

// List implements ui.Folders.
func (f *folders) List(k ui.FileKind) ([]ui.File, error) {
	files, err := list(f.own, k, false)
	if err != nil {
		return nil, fmt.Errorf("your folder: %w", err)
	}
	if f.shared != nil {
		sh, err := list(f.shared, k, true)
		if err != nil {
			return nil, fmt.Errorf("shared folder: %w", err)
		}
		files = append(files, sh...)
	}
	return files, nil
}

// list walks root for regular files of kind k, skipping hidden names (a
// save's temporary files among them) and symbolic links.
func list(root *os.Root, k ui.FileKind, shared bool) ([]ui.File, error) {
	var files []ui.File
	err := fs.WalkDir(root.FS(), ".", func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			if p == "." {
				return err
			}
			return nil // an unreadable subfolder is left out
		}
		if p == "." {
			return nil
		}
		if strings.HasPrefix(d.Name(), ".") {
			if d.IsDir() {
				return fs.SkipDir
			}
			return nil
		}
		if d.IsDir() {
			if strings.Count(p, "/")+1 >= maxDepth {
				return fs.SkipDir
			}
			return nil
		}
		if !d.Type().IsRegular() || !hasExt(d.Name(), extensions[k]) || !printable(p) {
			return nil
		}
		info, err := d.Info()
		if err != nil {
			return nil
		}
		files = append(files, ui.File{Name: p, Shared: shared, Size: info.Size()})
		if len(files) >= maxListed {
			return fs.SkipAll
		}
		return nil
	})
	sort.Slice(files, func(i, j int) bool { return files[i].Name < files[j].Name })
	return files, err
}

// printable reports whether a name can go on a terminal as it is: valid
// UTF-8 without control characters (which could drive the fellow's
// terminal), so names that are not are left out of lists.
func printable(name string) bool {
	if !utf8.ValidString(name) {
		return false
	}
	for _, r := range name {
		if r < 0x20 || r == 0x7f || (r >= 0x80 && r < 0xa0) {
			return false
		}
	}
	return true
}

// hasExt reports whether name ends in one of exts, in any case.
func hasExt(name string, exts []string) bool {
	e := strings.ToLower(path.Ext(name))
	for _, x := range exts {
		if e == x {
			return true
		}
	}
	return false
}

// Open implements ui.Folders: the name must be a plain relative path inside
// its folder, without hidden parts, and the file a regular one. It is opened
// without waiting (a FIFO would otherwise block) and checked once open.
func (f *folders) Open(file ui.File) (*os.File, error) {
	root := f.own
	if file.Shared {
		if f.shared == nil {
			return nil, errors.New("the lab has no shared folder")
		}
		root = f.shared
	}
	if err := checkRelative(file.Name); err != nil {
		return nil, err
	}
	fh, err := safefile.OpenIn(root, file.Name)
	if err != nil && !errors.Is(err, safefile.ErrNotRegular) {
		return nil, fmt.Errorf("cannot open %s: %w", file.Name, trimPathError(err))
	}
	return fh, err
}

// checkRelative refuses a name that is not a clean relative slash path
// inside its folder, or that has a hidden part.
func checkRelative(name string) error {
	if !fs.ValidPath(name) || name == "." || strings.Contains(name, `\`) {
		return fmt.Errorf("%s: not a file name inside the folder", strconv.Quote(name))
	}
	for _, part := range strings.Split(name, "/") {
		if strings.HasPrefix(part, ".") {
			return fmt.Errorf("%s: hidden names are not opened", strconv.Quote(name))
		}
	}
	return nil
}

// trimPathError drops the folder's path from an error of the os package, so
// that the screen never shows where DATA is on the server.
func trimPathError(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// SaveName checks the name of a file to save in a fellow's folder and adds
// ".yaml" when it has no YAML ending: a plain name of at most 64 characters
// (letters, digits, space, '.', '_', '-', '+', parentheses), not hidden and
// not in a subfolder.
func SaveName(name string) (string, error) {
	name = strings.TrimSpace(name)
	bad := func(why string) (string, error) {
		return "", fmt.Errorf("cannot save as %s: %s", strconv.Quote(name), why)
	}
	switch {
	case name == "":
		return bad("no name given")
	case strings.ContainsAny(name, `/\`):
		return bad("a name without folders (no / or \\): files are saved in your folder")
	case strings.HasPrefix(name, "."):
		return bad("a name that does not start with '.'")
	}
	for _, r := range name {
		ok := r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune(" ._-+()", r)
		if !ok {
			return bad(fmt.Sprintf("%q is not allowed; use letters, digits, space and . _ - + ( )", r))
		}
	}
	if !hasExt(name, extensions[ui.ScenarioFiles]) {
		name += ".yaml"
	}
	if len(name) > maxSaveName {
		return bad(fmt.Sprintf("at most %d characters", maxSaveName))
	}
	return name, nil
}

// Save implements ui.Folders: the data go to a hidden temporary file in the
// fellow's folder, synced, then renamed over the file (overwrite) or linked
// to its name, which fails if it exists; so no reader ever sees half a file,
// and a save that does not overwrite cannot replace a file made meanwhile.
func (f *folders) Save(name string, data []byte, overwrite bool) (ui.File, error) {
	name, err := SaveName(name)
	if err != nil {
		return ui.File{}, err
	}
	fail := func(err error) (ui.File, error) {
		return ui.File{}, fmt.Errorf("cannot save %s: %w", name, trimPathError(err))
	}
	var rnd [6]byte
	_, _ = rand.Read(rnd[:])
	tmp := "." + name + ".tmp-" + hex.EncodeToString(rnd[:])
	fh, err := f.own.OpenFile(tmp, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o640)
	if err != nil {
		return fail(err)
	}
	defer f.own.Remove(tmp) // gone after the rename; after a failure, cleared
	_, werr := fh.Write(data)
	if werr == nil {
		werr = fh.Sync()
	}
	if cerr := fh.Close(); werr == nil {
		werr = cerr
	}
	if werr != nil {
		return fail(werr)
	}
	replaced := false
	if overwrite {
		_, statErr := f.own.Lstat(name)
		replaced = statErr == nil
		err = f.own.Rename(tmp, name)
	} else {
		err = f.own.Link(tmp, name)
		if errors.Is(err, fs.ErrExist) {
			return ui.File{}, fmt.Errorf("%s: %w", name, presets.ErrExists)
		}
	}
	if err != nil {
		return fail(err)
	}
	if d, err := f.own.Open("."); err == nil {
		_ = d.Sync() // the new name survives a crash
		d.Close()
	}
	if f.saved != nil {
		f.saved(name, len(data), replaced)
	}
	return ui.File{Name: name, Size: int64(len(data))}, nil
}
