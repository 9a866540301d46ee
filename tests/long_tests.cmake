# The longest tests, each with its time in seconds (the sanitizer build's,
# measured 2026-12-05; the optimised build's for the browser's, which runs
# there only). ctest -j starts the costliest tests first, but on a fresh
# clone it has no measured times yet (Testing/Temporary/CTestCostData.txt)
# and starts them in the order of the list, so a long test drawn last keeps
# one core busy while the other idles. These estimates stand in until ctest
# has measured the tests itself (its own times then take over). Only the
# order depends on them: a name that no longer matches a test changes
# nothing else. tests/CMakeLists.txt includes this file after the tests are
# discovered, and gives the scenario.* tests their cost itself.
set(thermargin_long_tests
  "ChainSecondOpinion.MonteCarloBandMeanSpreadAndYieldOnEveryScenarioAndGeneratedDesign=20"
  "ChainSecondOpinion.NominalWorstCaseAndLinearBudgetOnEveryScenarioAndGeneratedDesign=17"
  "Picker.WithMoreThanSixteenInputsTheRankingEqualsTheDirectedWorstCaseOfEveryCandidate=10"
  "Picker.WinnerEqualsABruteForceWorstCaseOfEveryCandidateOnEveryScenario=9"
  "Picker.WinnerSearchedFromAnyStartIsTheWinnerWithTwoPointCalibration=9"
  "Picker.EveryConstraintThatExcludesTheUnconstrainedWinnerMovesThePickToTheBestCandidateMeetingIt=11"
  "Acquisition.AgreesWithScipySolveIvp=8"
  "BadInput.EveryCaseExitsTwoWithOneLineNamingWhereAndWhatIsAcceptedAndLeavesNoFile=7"
  "Picker.WinnerSearchedFromAnyStartIsTheWinnerOfTheLinearObjective=6"
  "Scenarios/WinnerFromAnyStart.IsTheWinnerOverTheWholeSeries/freezer_pt100_film=6"
  "ReportInBrowser.GradesPageOpensWithoutConsoleErrorsAndRenders=6"
  "Determinism.PickVerifyIsByteIdenticalAcrossRunsAndThreadCounts=5.5"
  "ChainSecondOpinion.MonteCarloOneSourceAtATimeSeesEverySourcesSpread=5.5"
  "WorstCase.EnumerationIsEveryCornerThroughTheChainOnEveryScenarioAndCalibration=5"
  "ReportInBrowser.BudgetPageOpensWithoutConsoleErrorsAndRenders=4.5"
  "ReportInBrowser.PickPageOpensWithoutConsoleErrorsAndRenders=4"
  "WhatIf.ImprovingOnePartNeverWidensTheWorstCaseOfAnyScenario=4"
  "GradesCli.EveryShippedCatalogueRunsAgainstTheDesignItIsNamedAfter=4"
  "BudgetCli.AdaptiveRunStopsWhenTheBandsAreStableAndSaysHowManyUnits=4"
  "BudgetCli.ContributorTablesPerTemperatureAndForTheWindowAreSharesOfTheCombinedVariance=4"
  "GradesCli.NumPyAgreesOnWorstCaseCostsFrontAndRecommendation=4"
  "ResponseCli.BudgetAddsTheDynamicErrorOnlyWhenTheRequirementSaysSo=3.5"
  "Picker.ConstraintThatExcludesTheUnconstrainedWinnerMovesThePickToTheBestFeasible=3.5"
  "BudgetWhatIf.SaysWhenNoSinglePartMeetsTheLimitAndOnlyThen=3.5"
  "Picker.PairSearchEqualsBruteForceOverEveryPairAndNone=3"
  "MonteCarloYield.UniformFixedResistorAloneMatchesTheClosedForm=3"
  "BudgetCli.StrictTurnsAFailingVerdictIntoExitThree=2.5"
  "GradesReport.TheReaderNoticesWhenThePageAndTheJsonAreDifferentRuns=2.5"
  "GradesReport.ChartAndTableMatchTheGradesJsonWithARecommendation=2.5")
foreach(entry IN LISTS thermargin_long_tests)
  string(REGEX MATCH "^(.*)=([0-9.]+)$" entry "${entry}")
  set_tests_properties("${CMAKE_MATCH_1}" PROPERTIES COST "${CMAKE_MATCH_2}")
endforeach()
