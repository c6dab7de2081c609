# Sourced by the bench scripts: builds wardload into a temporary directory
# and starts `serve --demo` on 127.0.0.1:$port, on PostgreSQL when DB is
# set and otherwise on SQLite in a fresh data directory. It sets work (the
# directory: wardload, serve.out with the demo passwords, serve.log),
# server_pid and store (the store flags for other wardload commands), and
# stops the server and removes work on exit.

work=$(mktemp -d)
server_pid=""
cleanup() {
	if [ -n "$server_pid" ]; then
		kill "$server_pid" 2>/dev/null || true
		wait "$server_pid" 2>/dev/null || true
	fi
	rm -rf "$work"
}
trap cleanup EXIT INT TERM

# start_demo_server PORT: builds, starts and waits until it listens.
start_demo_server() {
	go build -o "$work/wardload" ./cmd/wardload
	local kind=SQLite
	if [ -n "${DB:-}" ]; then
		store=(--db "$DB")
		kind=PostgreSQL
	else
		mkdir -p "$work/data"
		store=(--data-dir "$work/data")
	fi
	echo "== start server on 127.0.0.1:$1 ($kind)"
	"$work/wardload" serve --demo --addr "127.0.0.1:$1" "${store[@]}" >"$work/serve.out" 2>"$work/serve.log" &
	server_pid=$!
	for _ in $(seq 1 300); do
		grep -q '^listening on' "$work/serve.out" 2>/dev/null && return 0
		kill -0 "$server_pid" 2>/dev/null || { echo "bench: server exited" >&2; cat "$work/serve.log" >&2; exit 1; }
		sleep 0.1
	done
	echo "bench: server did not start" >&2
	exit 1
}
