package main

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"os"
)

func sha256Hex(b []byte) string {
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])
}

func asPathError(err error, pe **os.PathError) bool { return errors.As(err, pe) }
