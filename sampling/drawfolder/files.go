package drawfolder

// Names of the files in a draw folder.
const (
	WorksheetFile = "worksheet.csv"
	LedgerFile    = "ledger.csv"
	ManifestFile  = "manifest.json"
	// WorksheetSecondFile is the second, independent worksheet written
	// for the items the draw marked for a second label.
	WorksheetSecondFile = "worksheet-second.csv"
)
