/** Command identifiers, as contributed in package.json. */
export const COMMANDS = {
  runOnFile: 'countercheck.runOnFile',
  runOnSelection: 'countercheck.runOnSelection',
  runOnCellOutput: 'countercheck.runOnCellOutput',
  distributionLookup: 'countercheck.distributionLookup',
  planWithoutData: 'countercheck.planWithoutData',
  runSavedSpec: 'countercheck.runSavedSpec',
  rerunAndCompare: 'countercheck.rerunAndCompare',
  refreshAllBlocks: 'countercheck.refreshAllBlocks',
  refreshBlock: 'countercheck.refreshBlock',
  openSpecResult: 'countercheck.openSpecResult',
  openSampleData: 'countercheck.openSampleData',
} as const;
