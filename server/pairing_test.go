package server

import (
	"sync"
	"testing"
)

// Wrong guesses sent all at once from one client are limited as strictly as
// guesses sent one by one: the store's check happens outside the limiter's
// lock, so each attempt is counted before the code is looked at.
func TestPairParallelGuesses(t *testing.T) {
	ts := MustOpenServer(t)
	const n = 4 * guessesPerClient
	statuses := make([]int, n)
	var wg sync.WaitGroup
	for i := range n {
		wg.Add(1)
		go func() {
			defer wg.Done()
			statuses[i] = ts.do(t, "POST", "/pair", "", map[string]string{"code": "AAAA-AAAA", "name": "Guess"}).status
		}()
	}
	wg.Wait()
	count := map[int]int{}
	for _, s := range statuses {
		count[s]++
	}
	if count[401] > guessesPerClient || count[401]+count[429] != n {
		t.Errorf("%d parallel wrong guesses answered %v: want at most %d refused as wrong, the rest 429", n, count, guessesPerClient)
	}
	// A right code after wrong ones is not counted as a guess.
	ts2 := MustOpenServer(t)
	code, _, err := ts2.NewJoinCode("technician")
	if err != nil {
		t.Fatal(err)
	}
	for range guessesPerClient - 1 {
		want(t, ts2.do(t, "POST", "/pair", "", map[string]string{"code": "AAAA-AAAA", "name": "Guess"}), 401, "code")
	}
	for range 3 {
		want(t, ts2.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": "Phone"}), 201, "")
	}
	want(t, ts2.do(t, "POST", "/pair", "", map[string]string{"code": "AAAA-AAAA", "name": "Guess"}), 401, "code")
	want(t, ts2.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": "Phone"}), 429, "code")
}
