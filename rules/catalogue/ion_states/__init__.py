"""Rules about ion states and derived quantities (category `ion-states`),
with the facts they share: derives as energy differences (`derives`) and
what the reference table says about a deck's species (`species`)."""
