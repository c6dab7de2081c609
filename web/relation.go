package web

// RelationVM is the relationship check of a ward: care time per patient
// against one numeric factor the ward records with its observations.
type RelationVM struct {
	WardName  string
	URL       string // the page itself, for the filter form
	ReviewURL string
	// The filter: factor, tier ("" all tiers) and weeks, as chosen.
	Factors          []string
	Factor           string
	Tiers            []ReviewShiftVM // ID and Name of each tier
	TierID           string
	Weeks            string
	WindowText       string
	TierText         string
	Unit             string
	NoFactors        bool   // the ward records no numeric factor
	Missing          string // e.g. "312 observations without this factor are left out"
	N                string
	PearsonR         string
	SpearmanRho      string
	RSquared         string
	Line             string // "care = 12.3 + 4.5 × score", or "undefined"
	ResidualSD       string
	Flagged          string // number of pairs outside the fences
	PearsonRWithout  string // "" when no pair is flagged
	Warnings         []string
	AcrossTiersNote  string // said when all tiers are pooled
	Scatter          *ScatterVM
	CausationCaution string
}
