package server

import (
	"fmt"
	"net/http"
	"net/url"
	"sort"
	"strconv"
	"strings"
	"time"

	"wardload/internal/wardload"
	"wardload/web"
)

// auditPageSize is how many entries one audit page shows.
const auditPageSize = 50

// handleAudit lists audit entries with filters, newest first. An admin
// sees every entry; a manager sees the entries of their wards only, which
// leaves out entries tied to no ward (users, tokens, sign-ins).
func (s *Server) handleAudit(w http.ResponseWriter, r *http.Request) error {
	u := principalFrom(r.Context()).User
	q := r.URL.Query()
	vm := web.AuditVM{
		Ward: clip(q.Get("ward"), 32), Action: clip(q.Get("action"), 64), Entity: clip(q.Get("entity"), 64),
		User: clip(q.Get("user"), 40), From: clip(q.Get("from"), 10), To: clip(q.Get("to"), 10),
	}
	ws, _, err := s.store.FindWards(r.Context(), wardload.WardFilter{})
	if err != nil {
		return fmt.Errorf("audit: find wards: %w", err)
	}
	wards := make(map[int64]*wardload.Ward, len(ws))
	codes := make(map[int64]string, len(ws))
	for _, w := range ws {
		wards[w.ID], codes[w.ID] = w, w.Code
	}
	visible := codes
	if u.Role != wardload.RoleAdmin {
		visible = map[int64]string{}
		for _, id := range u.WardIDs {
			visible[id] = codes[id]
		}
	}
	for _, c := range visible {
		vm.WardCodes = append(vm.WardCodes, c)
	}
	sort.Strings(vm.WardCodes)
	vm.Actions = actionOptions(vm.Action)

	f, msg, err := s.auditFilter(r, vm, u, visible)
	if err != nil {
		return err
	}
	page, _ := strconv.Atoi(q.Get("page"))
	page = max(1, min(page, 1_000_000))
	status := http.StatusOK
	if msg != "" {
		vm.Error, status = msg, http.StatusBadRequest
	} else if f != nil {
		f.Offset, f.Limit = (page-1)*auditPageSize, auditPageSize
		es, total, err := s.store.FindAudit(r.Context(), *f)
		if err != nil {
			return fmt.Errorf("audit: %w", err)
		}
		vm.Total = total
		names, err := s.loadAuditNames(r.Context(), wards, es)
		if err != nil {
			return err
		}
		for _, e := range es {
			vm.Rows = append(vm.Rows, auditRow(e, wards[e.WardID], names, u.Role == wardload.RoleAdmin))
		}
		if len(es) > 0 {
			vm.PageText = fmt.Sprintf("Entries %d–%d of %d", f.Offset+1, f.Offset+len(es), total)
		}
		link := func(p int) string {
			v := url.Values{}
			for k, val := range map[string]string{"ward": vm.Ward, "action": vm.Action, "entity": vm.Entity,
				"user": vm.User, "from": vm.From, "to": vm.To} {
				if val != "" {
					v.Set(k, val)
				}
			}
			v.Set("page", strconv.Itoa(p))
			return "/audit?" + v.Encode()
		}
		if page > 1 {
			vm.PrevURL = link(page - 1)
		}
		if f.Offset+len(es) < total {
			vm.NextURL = link(page + 1)
		}
	}
	return s.render(w, r, status, web.AuditPage(s.layout(r, "Audit log"), vm))
}

// auditFilter turns the typed filters into an AuditFilter restricted to
// the wards the user may see. It returns a message for input that cannot
// be used, and a nil filter (no entries) when nothing could match.
func (s *Server) auditFilter(r *http.Request, vm web.AuditVM, u *wardload.User, visible map[int64]string) (*wardload.AuditFilter, string, error) {
	f := &wardload.AuditFilter{}
	for _, typed := range []string{vm.Action, vm.Entity, vm.User} {
		if !wardload.StorableText(typed) {
			// PostgreSQL refuses NUL and invalid UTF-8 even in a search.
			return nil, "A filter contains characters that cannot be searched for.", nil
		}
	}
	if vm.Ward != "" {
		var id int64
		for wid, c := range visible {
			if c == vm.Ward {
				id = wid
			}
		}
		if id == 0 {
			return nil, "Choose one of your wards.", nil
		}
		f.WardIDs = []int64{id}
	} else if u.Role != wardload.RoleAdmin {
		// An empty WardIDs would mean "every ward": a manager of no ward
		// must see nothing instead.
		if len(u.WardIDs) == 0 {
			return nil, "", nil
		}
		f.WardIDs = u.WardIDs
	}
	if vm.Action != "" {
		f.Action = &vm.Action
	}
	if vm.Entity != "" {
		f.Entity = &vm.Entity
	}
	if vm.User != "" {
		name := strings.ToLower(strings.TrimSpace(vm.User))
		found, err := s.store.FindUserByName(r.Context(), name)
		if wardload.ErrorCode(err) == wardload.ENOTFOUND {
			return nil, "There is no user called " + auditName(name) + ".", nil
		} else if err != nil {
			return nil, "", fmt.Errorf("audit: find user: %w", err)
		}
		f.UserID = &found.ID
	}
	for _, d := range []struct {
		text string
		dst  **time.Time
		add  int // days: "to" is inclusive, the filter's To exclusive
	}{{vm.From, &f.From, 0}, {vm.To, &f.To, 1}} {
		if d.text == "" {
			continue
		}
		t, err := time.Parse(time.DateOnly, d.text)
		if err != nil {
			return nil, "Dates must look like 2026-03-02.", nil
		}
		t = t.AddDate(0, 0, d.add)
		*d.dst = &t
	}
	return f, "", nil
}

// auditRow is one entry in words: when in its ward's time zone (named),
// who, what, the thing, the change field by field and a link to it.
func auditRow(e *wardload.AuditEntry, ward *wardload.Ward, names auditNames, admin bool) web.AuditRowVM {
	loc, zone := zoneOf(ward)
	w := auditWords{names: names, loc: loc}
	row := web.AuditRowVM{At: e.At.In(loc).Format("2006-01-02 15:04:05"), Zone: zone, Actor: e.Actor,
		What: actionName(e.Action), ActionCode: e.Action, Subject: w.subject(e), Changes: w.changes(e.Before, e.After)}
	if ward != nil {
		row.Ward = ward.Code
	}
	row.LinkURL, row.LinkText = auditLink(e, ward, admin)
	return row
}

// actionOptions is the action filter's list of plain names, with an
// action typed into an old address kept so that the filter shows it.
func actionOptions(current string) []web.AuditActionVM {
	out := make([]web.AuditActionVM, 0, len(auditActions)+1)
	known := false
	for _, a := range auditActions {
		out = append(out, web.AuditActionVM{Value: a.code, Name: a.name, Selected: a.code == current})
		known = known || a.code == current
	}
	if current != "" && !known {
		out = append(out, web.AuditActionVM{Value: current, Name: actionName(current), Selected: true})
	}
	return out
}
