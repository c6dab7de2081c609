package simstudy

import (
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"gonum.org/v1/gonum/stat/distuv"

	"wardload/internal/stats"
)

// CensusTier is one tier of an invented census history: on shift s of a
// date d weeks after the first (weekday w), its count is
//
//	y ~ Poisson(λ),  λ ~ Gamma(μ/(φ−1), φ−1)   (Var y = φμ; Poisson when φ = 1)
//	μ = Base · Weekday[w] · Shift[s] · (1 + Trend)^d
//
// the model ForecastCensus fits, so a calibrated forecast should hold its
// bands' nominal coverage.
type CensusTier struct {
	Code       string
	Base       float64
	Weekday    [7]float64 // multipliers, Sunday first (time.Weekday)
	Shift      []float64  // multipliers, by CensusScenario.Shifts
	Trend      float64    // relative change of the mean per week
	Dispersion float64    // φ ≥ 1
}

// CensusScenario is an invented ward's census: Weeks weeks of history from
// Start, each day's shifts, Missing the share of dated shifts left out at
// random (missing, not zero), and its beds.
type CensusScenario struct {
	Name    string
	Start   string
	Weeks   int
	Shifts  []string
	Tiers   []CensusTier
	Missing float64
	Beds    int
}

// CensusScenarios are the battery's wards: a known weekday pattern that
// differs by shift, a trend and overdispersion.
func CensusScenarios() []CensusScenario {
	week := [7]float64{0.85, 1.15, 1.2, 1.1, 1.05, 1.0, 0.75}
	flat := [7]float64{1, 1, 1, 1, 1, 1, 1}
	first := CensusScenario{Name: "weekday+trend, phi 2", Start: "2026-01-05", Weeks: 30, Shifts: []string{"Day", "Night"}, Beds: 200,
		Tiers: []CensusTier{
			{Code: "t1", Base: 8, Weekday: week, Shift: []float64{1, 0.8}, Trend: 0.01, Dispersion: 2},
			{Code: "t2", Base: 5, Weekday: flat, Shift: []float64{1, 0.9}, Trend: -0.005, Dispersion: 1.5},
			{Code: "t3", Base: 2, Weekday: week, Shift: []float64{1, 1}, Trend: 0, Dispersion: 1.2},
		}}
	// A new ward: the first scenario with 9 weeks of history, so every
	// origin has 4 to 8 weeks to learn from.
	young := first
	young.Name, young.Weeks = "new ward, 9 weeks", 9
	return []CensusScenario{first,
		{Name: "three shifts, 5% missing", Start: "2026-01-05", Weeks: 30, Shifts: []string{"Early", "Late", "Night"}, Beds: 200, Missing: 0.05,
			Tiers: []CensusTier{
				{Code: "t1", Base: 12, Weekday: week, Shift: []float64{1, 0.95, 0.85}, Trend: 0.005, Dispersion: 1.8},
				{Code: "t2", Base: 4, Weekday: week, Shift: []float64{1, 1, 0.9}, Trend: 0, Dispersion: 1},
			}},
		young,
	}
}

// GenerateCensus draws one history of sc from seed.
func GenerateCensus(sc CensusScenario, seed uint64) []stats.CensusCount {
	r := rand.New(rand.NewPCG(seed, 0x63656e737573))
	start, err := time.Parse(time.DateOnly, sc.Start)
	if err != nil {
		panic("simstudy: bad scenario start " + sc.Start)
	}
	var out []stats.CensusCount
	for d := range 7 * sc.Weeks {
		day := start.AddDate(0, 0, d)
		for s, shift := range sc.Shifts {
			if r.Float64() < sc.Missing {
				continue
			}
			for _, t := range sc.Tiers {
				mu := t.Base * t.Weekday[day.Weekday()] * t.Shift[s] * math.Pow(1+t.Trend, float64(d)/7)
				out = append(out, stats.CensusCount{Date: day.Format(time.DateOnly), Shift: shift, Tier: t.Code,
					Patients: overdispersed(r, mu, t.Dispersion)})
			}
		}
	}
	return out
}

func overdispersed(r *rand.Rand, mu, phi float64) int {
	lambda := mu
	if phi > 1 {
		lambda = distuv.Gamma{Alpha: mu / (phi - 1), Beta: 1 / (phi - 1), Src: r}.Rand()
	}
	return int(distuv.Poisson{Lambda: lambda, Src: r}.Rand())
}

// CensusBatteryRow is one scenario × horizon of the census battery, pooled
// over replications.
type CensusBatteryRow struct {
	Scenario    string
	Horizon     int
	Checked     int
	Coverage    []float64 // integer bands
	PITCoverage []float64 // randomized PIT (what calibration promises)
	PITSE       []float64 // Monte Carlo SE of PITCoverage, from the replications' spread
	MASE        float64
	RelMAE      float64 // MAE / seasonal-naive MAE
	AvgCut      float64 // 1 − MAE / fixed-average MAE
}

// RunCensusBattery backtests reps histories of sc (seeds seed, seed+1, …)
// with the newest `origins` weekly origins each and pools the horizons.
func RunCensusBattery(sc CensusScenario, reps, origins, draws int, seed uint64, levels []float64) ([]CensusBatteryRow, error) {
	horizons := []int{1, 7, 14, 28}
	rows := make([]CensusBatteryRow, len(horizons))
	perRep := make([][][]float64, len(horizons)) // [h][level][rep]
	var mae, naive, avg, mase [4]float64
	for i, h := range horizons {
		rows[i] = CensusBatteryRow{Scenario: sc.Name, Horizon: h, Coverage: make([]float64, len(levels)),
			PITCoverage: make([]float64, len(levels)), PITSE: make([]float64, len(levels))}
		perRep[i] = make([][]float64, len(levels))
	}
	for rep := range reps {
		hist := GenerateCensus(sc, seed+uint64(rep))
		res, err := stats.BacktestCensus(hist, stats.CensusBacktestOptions{Horizons: horizons, Levels: levels,
			Draws: draws, Seed: seed + uint64(rep), Beds: sc.Beds, Origins: origins})
		if err != nil {
			return nil, fmt.Errorf("simstudy: census battery %s, replication %d: %w", sc.Name, rep, err)
		}
		for i, h := range res.Horizons {
			n := float64(h.Checked)
			rows[i].Checked += h.Checked
			for l := range levels {
				rows[i].Coverage[l] += h.Coverage[l] * n
				rows[i].PITCoverage[l] += h.PITCoverage[l] * n
				perRep[i][l] = append(perRep[i][l], h.PITCoverage[l])
			}
			c := float64(h.Compared)
			mae[i] += h.MAE * c
			naive[i] += h.MAENaive * c
			avg[i] += h.MAEAverage * c
			mase[i] += h.MASE * float64(h.Scaled)
			rows[i].MASE += float64(h.Scaled) // total scaled, divided below
		}
	}
	for i := range rows {
		n := float64(rows[i].Checked)
		for l := range levels {
			rows[i].Coverage[l] /= n
			rows[i].PITCoverage[l] /= n
			_, rows[i].PITSE[l] = meanSE(perRep[i][l])
		}
		rows[i].MASE = mase[i] / rows[i].MASE
		rows[i].RelMAE = mae[i] / naive[i]
		rows[i].AvgCut = 1 - mae[i]/avg[i]
	}
	return rows, nil
}
