// The addresses of the pages, built in one place so that links, redirects
// and the route table agree. Each takes the ward the page belongs to.

package server

import (
	"fmt"

	"wardload/internal/wardload"
)

// censusURL is the address of the ward's census form.
func censusURL(ward *wardload.Ward) string { return "/wards/" + ward.Code + "/census" }

// projectionURL is the address of one stored projection.
func projectionURL(ward *wardload.Ward, id int64) string {
	return fmt.Sprintf("/wards/%s/projections/%d", ward.Code, id)
}

// projectionsURL is the address of the ward's shift list.
func projectionsURL(ward *wardload.Ward) string { return "/wards/" + ward.Code + "/projections" }

// importURL is the address of the observation import form.
func importURL(ward *wardload.Ward) string { return "/wards/" + ward.Code + "/observations/import" }

// templateURL is the address of the ward's blank import file.
func templateURL(ward *wardload.Ward) string {
	return "/wards/" + ward.Code + "/observations/template.csv"
}

// reviewURL is the address of the weekly review.
func reviewURL(ward *wardload.Ward) string { return "/wards/" + ward.Code + "/review" }

// staffingURL is the address of the ward's planned-staff form for date
// ("" for its default day).
func staffingURL(ward *wardload.Ward, date string) string {
	if date == "" {
		return "/wards/" + ward.Code + "/staffing"
	}
	return "/wards/" + ward.Code + "/staffing?date=" + date
}

// staffingReportURL is the address of a ward's planned-and-worked report.
func staffingReportURL(ward *wardload.Ward) string { return "/wards/" + ward.Code + "/staffing-report" }

// relationURL is the address of the ward's relationship check.
func relationURL(ward *wardload.Ward) string { return "/wards/" + ward.Code + "/relationship" }

// settingsURL is the address of the ward's settings page; its forms
// post below it.
func settingsURL(ward *wardload.Ward) string { return "/wards/" + ward.Code + "/settings" }

// tokensURL is the address of a ward's token page.
func tokensURL(ward *wardload.Ward) string { return "/wards/" + ward.Code + "/tokens" }

// setupURL is the address of the ward's set-up checklist.
func setupURL(ward *wardload.Ward) string { return "/wards/" + ward.Code + "/setup" }

// wardEditURL is the address of the admin's form for the ward; it posts
// to wardAdminURL and retires below it.
func wardEditURL(ward *wardload.Ward) string { return wardAdminURL(ward) + "/edit" }

// wardAdminURL is where the admin's ward form posts.
func wardAdminURL(ward *wardload.Ward) string { return "/admin/wards/" + ward.Code }
