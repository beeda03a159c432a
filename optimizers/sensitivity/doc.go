// Package sensitivity tells which design variables matter: Morris
// elementary effects for screening many variables cheaply (Morris 1991,
// with the mean absolute effect μ* of Campolongo, Cariboni and Saltelli
// 2007), and Sobol' first-order and total indices by the estimators of
// Saltelli et al. (2010) and Jansen (1999) with bootstrap confidence
// intervals, on a Sobol' low-discrepancy sequence with the direction
// numbers of Joe and Kuo (2008).
//
// A Model answers a batch of points of the unit box; FuncModel wraps a
// plain function on physical bounds and StudyModel reads one quantity of
// an mdo study through its Evaluator (so the worker pool and the cache are
// used, and screening several quantities of one study with the same seed
// analyses each point once). Every random choice comes from the seed
// given; the same seed gives the same indices, bit for bit.
//
// Indices are estimates of a conceptual model's behaviour, not of the
// aircraft's: they say which inputs move the model's answer.
package sensitivity
