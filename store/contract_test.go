package store_test

import (
	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web"
)

// store.DB is the web layer's Store.
var _ web.Store = (*store.DB)(nil)
