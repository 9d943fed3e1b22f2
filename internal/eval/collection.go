package eval

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// File names inside a collection folder.
const (
	TopicsFile = "topics.tsv"
	QrelsFile  = "qrels.txt"
)

// Collection is a test collection's topics and judgments, read from a
// folder holding topics.tsv and qrels.txt. Documents (docs.jsonl) are not
// read here; indexing them is the caller's business.
type Collection struct {
	// Dir is the folder the collection was loaded from.
	Dir string
	// Name is the folder's base name, e.g. "cranfield".
	Name string
	// Topics are the topics in file order.
	Topics []Topic
	// Qrels are the judgments.
	Qrels Qrels
	// Warnings lists consistency problems that do not stop evaluation, in
	// a fixed order: topics without judgments, judged topics without a
	// topic line, topics judged without any relevant document.
	Warnings []string
}

// LoadCollection reads dir/topics.tsv and dir/qrels.txt and checks that
// they agree. Unreadable or malformed files are errors (malformed ones
// match ErrMalformed); disagreements are reported in Warnings.
func LoadCollection(dir string) (*Collection, error) {
	c := &Collection{Dir: dir, Name: filepath.Base(filepath.Clean(dir))}
	var err error
	if c.Topics, err = readFile(filepath.Join(dir, TopicsFile), ReadTopics); err != nil {
		return nil, err
	}
	if c.Qrels, err = readFile(filepath.Join(dir, QrelsFile), ReadQrels); err != nil {
		return nil, err
	}
	c.Warnings = c.check()
	return c, nil
}

func readFile[T any](path string, read func(io.Reader) (T, error)) (T, error) {
	var zero T
	f, err := os.Open(path)
	if err != nil {
		return zero, fmt.Errorf("eval: load collection: %w", err)
	}
	defer f.Close()
	v, err := read(f)
	if err != nil {
		return zero, fmt.Errorf("eval: load collection %s: %w", path, err)
	}
	return v, nil
}

func (c *Collection) check() []string {
	var warn []string
	have := make(map[string]bool, len(c.Topics))
	for _, t := range c.Topics {
		have[t.ID] = true
		if _, ok := c.Qrels[t.ID]; !ok {
			warn = append(warn, fmt.Sprintf("topic %s has no judgments", t.ID))
		}
	}
	judged := c.Qrels.Topics()
	for _, qid := range judged {
		if !have[qid] {
			warn = append(warn, fmt.Sprintf("judged topic %s has no topic line", qid))
		}
	}
	for _, qid := range judged {
		if c.Qrels.NumRelevant(qid) == 0 {
			warn = append(warn, fmt.Sprintf("topic %s has no relevant document", qid))
		}
	}
	return warn
}

// Topic returns the topic with id qid.
func (c *Collection) Topic(qid string) (Topic, bool) {
	for _, t := range c.Topics {
		if t.ID == qid {
			return t, true
		}
	}
	return Topic{}, false
}
