#pragma once
// budledger::propose — events from per-frame evidence by a temporal model:
// a hidden Markov model over trap states with cell-cycle constraints, Viterbi
// for the calls and forward-backward posteriors for their confidences.
//  - evidence.h:    FrameEvidence, what measure hands over per trap-frame
//  - sparse_hmm.h:  generic sparse HMM, Viterbi and forward-backward
//  - cycle_model.h: the states of a trap and their allowed transitions
//  - emission.h:    evidence likelihoods and their EM re-estimation
//  - proposer.h:    proposePosition(), the entry point
#include "core/propose/cycle_model.h"
#include "core/propose/emission.h"
#include "core/propose/evidence.h"
#include "core/propose/proposer.h"
#include "core/propose/sparse_hmm.h"
