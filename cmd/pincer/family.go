package main

import (
	"errors"
	"fmt"
	"os"
	"sort"
	"strings"

	"github.com/spf13/cobra"

	"pincer/instances"
)

// formatEntry is one --format value and the family that reads it.
type formatEntry struct {
	fam    instances.Family
	format instances.Format
}

func formats() []formatEntry {
	var out []formatEntry
	for _, f := range registry() {
		for _, ft := range f.Formats() {
			out = append(out, formatEntry{f, ft})
		}
	}
	return out
}

func formatNames() []string {
	var names []string
	for _, e := range formats() {
		names = append(names, e.format.Name)
	}
	return names
}

// formatHelp is the --format flag's help text, one line per format.
func formatHelp() string {
	var b strings.Builder
	b.WriteString("input format, one of:")
	for _, e := range formats() {
		fmt.Fprintf(&b, "\n  %s: %s", e.format.Name, e.format.About)
	}
	return b.String()
}

func findFormat(format string) (formatEntry, error) {
	for _, e := range formats() {
		if e.format.Name == format {
			return e, nil
		}
	}
	names := strings.Join(formatNames(), ", ")
	if format == "" {
		return formatEntry{}, badInput(fmt.Errorf("--format is required (one of %s)", names))
	}
	return formatEntry{}, badInput(fmt.Errorf("unknown --format %q (want one of %s)", format, names))
}

// formatArg finds the --format value among raw arguments, so that only the
// chosen family's options are registered.
func formatArg(args []string) string {
	for k, a := range args {
		if a == "--" {
			break
		}
		if v, ok := strings.CutPrefix(a, "--format="); ok {
			return v
		}
		if a == "--format" && k+1 < len(args) {
			return args[k+1]
		}
	}
	return ""
}

// optValue is a flag backed by an option description: every value is
// checked against the option's kind and range as it is parsed.
type optValue struct {
	opt instances.Option
	v   any
	raw string
}

func (o *optValue) String() string { return o.raw }
func (o *optValue) Type() string   { return o.opt.Kind.String() }
func (o *optValue) Set(s string) error {
	v, err := o.opt.Parse(s)
	if err != nil {
		return err
	}
	o.v, o.raw = v, s
	return nil
}

// optionSet is a set of option flags on one command.
type optionSet struct {
	vals []*optValue
}

// add registers opts as flags, skipping names already registered.
func (s *optionSet) add(cmd *cobra.Command, opts []instances.Option) {
	for _, o := range opts {
		if cmd.Flags().Lookup(o.Name) != nil {
			continue
		}
		ov := &optValue{opt: o, raw: o.Default}
		v, err := o.Parse(o.Default)
		if err != nil {
			panic(fmt.Sprintf("option %s: bad default: %v", o.Name, err)) // a family's programming error
		}
		ov.v = v
		usage := o.Usage
		if r := o.Range(); r != "any text" {
			usage += " (" + r + ")"
		}
		f := cmd.Flags().VarPF(ov, o.Name, "", usage)
		f.DefValue = o.Default
		if o.Kind == instances.Bool {
			f.NoOptDefVal = "true"
		}
		if len(o.Allowed) > 0 {
			allowed := o.Allowed
			_ = cmd.RegisterFlagCompletionFunc(o.Name, func(*cobra.Command, []string, string) ([]string, cobra.ShellCompDirective) {
				return allowed, cobra.ShellCompDirectiveNoFileComp
			})
		}
		s.vals = append(s.vals, ov)
	}
}

// values returns the parsed values.
func (s *optionSet) values() instances.Values {
	v := instances.Values{}
	for _, o := range s.vals {
		v[o.opt.Name] = o.v
	}
	return v
}

// familyOptions registers --format and the model options: those of the
// family that reads format, or the union of all families' when format is
// not a known format (for help and completion).
func familyOptions(cmd *cobra.Command, format *string, chosen string) *optionSet {
	cmd.Flags().StringVar(format, "format", "", formatHelp())
	_ = cmd.RegisterFlagCompletionFunc("format", func(*cobra.Command, []string, string) ([]string, cobra.ShellCompDirective) {
		return formatNames(), cobra.ShellCompDirectiveNoFileComp
	})
	s := &optionSet{}
	if e, err := findFormat(chosen); err == nil {
		s.add(cmd, e.fam.Options())
		return s
	}
	s.add(cmd, unionOptions())
	return s
}

// unionOptions merges every family's options for help and completion when
// no known --format is given; each usage names its family. The union
// checks no ranges: the run stops at the missing --format anyway.
func unionOptions() []instances.Option {
	var out []instances.Option
	at := map[string]int{}
	for _, f := range registry() {
		for _, o := range f.Options() {
			use := f.Name() + ": " + o.Usage
			if r := o.Range(); r != "any text" {
				use += " (" + r + ")"
			}
			if k, ok := at[o.Name]; ok {
				out[k].Usage += "; " + use
				continue
			}
			o.Usage = use
			o.Allowed = nil
			o.HasMin, o.HasMax = false, false
			at[o.Name] = len(out)
			out = append(out, o)
		}
	}
	return out
}

// flagHint explains an unknown flag that belongs to another family.
func flagHint(cmd *cobra.Command, err error) error {
	msg := err.Error()
	name, ok := strings.CutPrefix(msg, "unknown flag: --")
	if !ok {
		return badInput(err)
	}
	var owners []string
	for _, e := range formats() {
		for _, o := range e.fam.Options() {
			if o.Name == name {
				owners = append(owners, e.format.Name)
			}
		}
	}
	if len(owners) == 0 {
		return badInput(err)
	}
	format, _ := cmd.Flags().GetString("format")
	return badInput(fmt.Errorf("--%s does not apply to --format %s (it is an option of %s)", name, format, strings.Join(owners, ", ")))
}

// load reads a file in format with the command's option values. When the
// file does not parse, the message says which other formats it parses under.
func load(format, path string, opts *optionSet) (instances.Model, error) {
	e, err := findFormat(format)
	if err != nil {
		return nil, err
	}
	m, err := e.fam.Load(format, path, opts.values())
	if err != nil {
		var pe *instances.ParseError
		if errors.As(err, &pe) {
			if others := parsesAs(path, format); len(others) > 0 {
				err = fmt.Errorf("%w\n(the file parses as --format %s)", err, strings.Join(others, " or "))
			}
		}
		return nil, badInput(err)
	}
	return m, nil
}

// parsesAs lists the other formats under which path loads with default
// options.
func parsesAs(path, except string) []string {
	st, statErr := os.Stat(path)
	var out []string
	for _, e := range formats() {
		if e.format.Name == except || statErr != nil || st.IsDir() != e.format.Folder {
			continue
		}
		v, err := instances.Defaults(e.fam.Options())
		if err != nil {
			continue
		}
		if _, err := e.fam.Load(e.format.Name, path, v); err == nil {
			out = append(out, e.format.Name)
		}
	}
	return out
}

// sortResources puts binding resources first, then by price.
func sortResources(rs []instances.Resource) {
	sort.SliceStable(rs, func(a, b int) bool {
		if rs[a].Binding != rs[b].Binding {
			return rs[a].Binding
		}
		return rs[a].Price > rs[b].Price
	})
}
